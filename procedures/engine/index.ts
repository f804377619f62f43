export * from './evaluate';
