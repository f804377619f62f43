// Photo ingest benchmark (not a test): one 12-megapixel phone-sized JPEG through the whole
// POST /api/photos (multipart, checks, sharp, SHA-256, two puts to the S3 stand-in, the row)
// against the bare sharp work on the same file (decode, rotate, two resizes to JPEG).
// Run: npx tsx test/bench/photo-ingest.ts   (or npm run bench:photos)
// It starts its own throwaway PostgreSQL and S3 stand-in, and removes them at the end.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import sharp from 'sharp';
import { ROOT, say } from '../../scripts/lib/stack';
import { withBenchServers } from './support/processes';

const RUNS = Number(process.env['BENCH_RUNS'] ?? 10);
const WARM_UP = 2;
const WIDTH = 4000;
const HEIGHT = 3000;
const GOAL_RATIO = 1.3;
const GOAL_RSS_MB = 300;

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};
const ms = (n: number) => `${n.toFixed(1)} ms`;

/**
 * A 12 MP test picture about the size of a phone's (grain all over), with EXIF orientation 6
 * (held sideways). Made in a child process, so that making it does not count in this
 * process's peak memory.
 */
function phoneLikeJpeg(file: string): Buffer {
  const script = `import sharp from 'sharp';
await sharp({ create: { width: ${WIDTH}, height: ${HEIGHT}, channels: 3, background: '#6a7580', noise: { type: 'gaussian', mean: 110, sigma: 8 } } })
  .withMetadata({ orientation: 6 }).jpeg({ quality: 90 }).toFile(${JSON.stringify(file)});`;
  const made = spawnSync(process.execPath, ['--input-type=module', '-e', script], { cwd: ROOT, encoding: 'utf8' });
  if (made.status !== 0) throw new Error(`could not make the test photo: ${made.stderr}`);
  return readFileSync(file);
}

/**
 * The bare image work, written straight in sharp with the settings the API uses: decode,
 * turn upright, resize to the display JPEG, and resize that to the thumbnail JPEG.
 */
async function bareSharp(bytes: Buffer): Promise<void> {
  const display = await sharp(bytes, { limitInputPixels: 50_000_000, failOn: 'error' })
    .rotate()
    .flatten({ background: '#ffffff' })
    .resize({ width: 1600, height: 1600, fit: 'inside', withoutEnlargement: true })
    .jpeg({ quality: 82, chromaSubsampling: '4:2:0' })
    .toBuffer();
  await sharp(display).resize({ width: 320, height: 320, fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 76, chromaSubsampling: '4:2:0' }).toBuffer();
}

const tmp = mkdtempSync(join(tmpdir(), 'setwright-bench-photo-'));
try {
  await withBenchServers({}, async ({ api }) => {
  const { DEMO_PASSWORD, DEMO_PEOPLE } = await import('../../api/db/seed');
  const base = `${api.url}/api`;

  const trainee = DEMO_PEOPLE.find((p) => p.roles.includes('trainee'))!;
  const login = await fetch(`${base}/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: trainee.email, password: DEMO_PASSWORD }),
  });
  const { accessToken } = (await login.json()) as { accessToken: string };

  // The API process with everything loaded and one sign-in done, no photo yet.
  const rssBeforePhotosMb = api.memoryMb().rss;
  say(`making a ${WIDTH} × ${HEIGHT} test JPEG…`);
  const photo = phoneLikeJpeg(join(tmp, 'bench.jpg'));
  say(`test photo: ${(photo.length / 1024 / 1024).toFixed(2)} MB, ${((WIDTH * HEIGHT) / 1e6).toFixed(0)} MP, EXIF orientation 6`);

  async function throughEndpoint(): Promise<void> {
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(photo)], { type: 'image/jpeg' }), 'bench.jpg');
    const res = await fetch(`${base}/photos`, { method: 'POST', headers: { authorization: `Bearer ${accessToken}` }, body: form });
    const body = (await res.json()) as { id: string; display: { width: number; height: number } };
    if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${JSON.stringify(body)}`);
    if (body.display.width !== 1200 || body.display.height !== 1600) throw new Error(`unexpected display size ${body.display.width}×${body.display.height}`);
  }

  const endpoint: number[] = [];
  const bare: number[] = [];
  for (let i = 0; i < WARM_UP; i++) {
    await throughEndpoint();
    await bareSharp(photo);
  }
  // Interleaved, so drift in the machine's load falls on both alike.
  for (let i = 0; i < RUNS; i++) {
    let t = performance.now();
    await throughEndpoint();
    endpoint.push(performance.now() - t);
    t = performance.now();
    await bareSharp(photo);
    bare.push(performance.now() - t);
  }

  const endpointMedian = median(endpoint);
  const bareMedian = median(bare);
  const ratio = endpointMedian / bareMedian;
  const peakRssMb = api.memoryMb().peak;
  console.log('');
  console.log(`photo ingest, ${RUNS} runs each after ${WARM_UP} warm-up (Node ${process.version}, sharp ${sharp.versions.sharp}, libvips ${sharp.versions.vips})`);
  console.log(`  whole endpoint   median ${ms(endpointMedian)}   (min ${ms(Math.min(...endpoint))}, max ${ms(Math.max(...endpoint))})`);
  console.log(`  bare sharp       median ${ms(bareMedian)}   (min ${ms(Math.min(...bare))}, max ${ms(Math.max(...bare))})`);
  console.log(`  ratio            ${ratio.toFixed(2)}   (goal ≤ ${GOAL_RATIO}) ${ratio <= GOAL_RATIO ? 'met' : 'NOT met'}`);
  console.log(`  API process peak RSS ${peakRssMb.toFixed(0)} MB   (goal ≤ ${GOAL_RSS_MB} MB) ${peakRssMb <= GOAL_RSS_MB ? 'met' : 'NOT met'}; measured on the API's own process, apart from this harness`);
  console.log(`    of which       ${rssBeforePhotosMb.toFixed(0)} MB before the first photo (the API loaded and signed in)`);
  console.log(`    photo work     +${(peakRssMb - rssBeforePhotosMb).toFixed(0)} MB at its peak`);
  });
} catch (err) {
  console.error(`[setwright] the benchmark failed: ${(err as Error).stack ?? err}`);
  process.exitCode = 1;
} finally {
  rmSync(tmp, { recursive: true, force: true });
}
