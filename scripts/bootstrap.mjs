// Installs what Setwright needs before anything else runs. Plain Node, no packages:
// it runs before node_modules exists. `--for-tests` also makes sure Chromium is there.
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';

const root = new URL('..', import.meta.url).pathname;
const forTests = process.argv.includes('--for-tests');
const isRoot = process.getuid?.() === 0;
let aptUpdated = false;

function say(message) {
  console.log(`[setwright] ${message}`);
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', cwd: root, ...opts });
  if (r.status !== 0) {
    console.error(`[setwright] '${cmd} ${args.join(' ')}' failed (exit ${r.status}).`);
    process.exit(1);
  }
}

function aptInstall(pkg, why) {
  if (!isRoot) {
    console.error(`[setwright] ${why} is missing. Install it first: sudo apt-get install -y ${pkg}`);
    process.exit(1);
  }
  say(`installing ${pkg} from Debian (${why})…`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (!aptUpdated) {
    run('apt-get', ['update', '-qq'], { env });
    aptUpdated = true;
  }
  run('apt-get', ['install', '-y', '-qq', '--no-install-recommends', pkg], { env });
}

// 1. npm packages: install when node_modules is missing or older than the lock file.
const lock = join(root, 'package-lock.json');
const stamp = join(root, 'node_modules', '.package-lock.json');
if (!existsSync(stamp) || statSync(stamp).mtimeMs < statSync(lock).mtimeMs) {
  say('installing npm packages (npm ci)…');
  run('npm', ['ci', '--no-audit', '--no-fund']);
}

// 2. PostgreSQL server binaries from Debian.
const pgRoot = '/usr/lib/postgresql';
const hasPg = existsSync(pgRoot) && readdirSync(pgRoot).some((v) => existsSync(join(pgRoot, v, 'bin', 'pg_ctl')));
if (!hasPg) aptInstall('postgresql', 'the PostgreSQL server');

// 3. Chromium for the browser tests.
if (forTests && !existsSync(process.env.CHROME_BIN || '/usr/bin/chromium')) {
  aptInstall('chromium', 'Chromium for the browser tests');
}

// 4. poppler-utils (pdftoppm, pdftotext): the QR-label tests render the PDF as a printer would and read it back.
if (forTests && !existsSync('/usr/bin/pdftoppm')) {
  aptInstall('poppler-utils', 'pdftoppm for the QR-label tests');
}

