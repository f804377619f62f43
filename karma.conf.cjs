// Karma for the client specs: Debian's Chromium, headless, no sandbox (CI runs as root).
module.exports = function (config) {
  config.set({
    basePath: '',
    frameworks: ['jasmine'],
    plugins: [require('karma-jasmine'), require('karma-chrome-launcher')],
    client: { jasmine: { random: true }, clearContext: false },
    reporters: ['progress'],
    browsers: ['ChromeHeadlessCI'],
    customLaunchers: {
      ChromeHeadlessCI: {
        base: 'ChromeHeadless',
        flags: ['--no-sandbox', '--disable-gpu', '--disable-dev-shm-usage', '--disable-background-networking',
          '--disable-component-update', '--disable-sync', '--no-first-run'],
      },
    },
    browserNoActivityTimeout: 120000,
    singleRun: true,
    restartOnFileChange: false,
  });
};
