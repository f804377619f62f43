// npm run bench: every benchmark in one go, each printing its own table of figures.
import { spawnSync } from 'node:child_process';
import { ROOT } from '../../scripts/lib/stack';

const steps: [string, string[]][] = [
  ['step-entry throughput against a bare Express echo', ['tsx', 'test/bench/throughput.ts']],
  ['per-request time, CPU and SQL statements of the busiest routes', ['tsx', 'test/bench/statements.ts']],
  ['photo ingest against bare sharp', ['tsx', 'test/bench/photo-ingest.ts']],
  ['PDF against bare pdfkit, and the archive query at 100,000 records', ['tsx', 'test/bench/pdf-and-archive.ts']],
  ['offline queue drain', ['tsx', 'test/bench/offline-drain.ts']],
  ['initial JavaScript transfer size', ['tsx', 'test/bench/bundle-size.ts']],
];
let failed = 0;
for (const [title, args] of steps) {
  console.log(`\n## ${title}`);
  const r = spawnSync('npx', args, { cwd: ROOT, stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
process.exit(failed ? 1 : 0);
