// Record PDF and archive benchmark (not a test). Run: npm run bench:pdf
//  1. A 30-step signed record with 12 photos rendered by our PDF renderer, against bare pdfkit drawing
//     the same text and images with the same embedded fonts, interleaved in the same run (medians, ratio).
//  2. The archive query on 100,000 generated records and 2 million step entries (made with SQL
//     generate_series in a throwaway PostgreSQL this script starts and removes): p95 of the default
//     page and of filtered pages.
import { chmodSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import pg from 'pg';
import { QueryTypes } from 'sequelize';
import PDFDocument from 'pdfkit';
import sharp from 'sharp';
import { freePort } from '../../scripts/lib/ports';
import { prepareDatabase, say, startStack, throwawaySecrets, type Stack } from '../../scripts/lib/stack';
import { evaluateStep } from '../../procedures/engine';
import { procedureSchema } from '../../procedures/schema';
import type { RecordPdfData } from '../../api/modules/pdf/data';
import { pdfFonts, renderRecordPdf } from '../../api/modules/pdf/render';

const PDF_RUNS = Number(process.env['BENCH_RUNS'] ?? 15);
const WARM_UP = 3;
const STEPS = 30;
const PHOTOS = 12;
const RECORDS = Number(process.env['BENCH_RECORDS'] ?? 100_000);
const ENTRIES_PER_RECORD = 20; // 2,000,000 entries for 100,000 records
const QUERY_RUNS = Number(process.env['BENCH_QUERY_RUNS'] ?? 200);
const GOAL_RATIO = 1.5;
const GOAL_PDF_MS = 400;
const GOAL_QUERY_MS = 40;

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};
const p95 = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.ceil(xs.length * 0.95) - 1)]!;
const ms = (n: number) => `${n.toFixed(1)} ms`;
const verdict = (ok: boolean) => (ok ? 'met' : 'NOT met');

/** A thumbnail like the stored ones: 320 × 240 JPEG with grain, so it does not compress to nothing. */
function thumbnail(i: number): Promise<Buffer> {
  return sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 60 + i * 12, g: 90, b: 120 }, noise: { type: 'gaussian', mean: 100, sigma: 20 } } })
    .jpeg({ quality: 76 })
    .toBuffer();
}

/** A 30-step record: each step a reading with limits and a worked-out value; 12 of them with a photo each. */
async function benchRecord(): Promise<RecordPdfData> {
  const steps = Array.from({ length: STEPS }, (_, i) => ({
    id: `step-${i + 1}`,
    title: `Check ${i + 1}: guide roller clearance at position ${i + 1}`,
    kind: i % 5 === 0 ? 'isolation' : 'reading',
    powered: i % 7 === 3,
    instruction: 'Slide the feeler leaf between the roller and the blade back; it should drag slightly. Record the thickest leaf that fits without forcing.',
    cautions: i % 4 === 0 ? [{ level: 'mandatory', code: 'M009', text: 'Wear cut-resistant gloves while the saw is isolated; never near a running blade.' }] : [],
    inputs: [
      { id: 'gap', type: 'number', label: 'Clearance', unit: 'mm', decimals: 2, limits: { min: 0.08, max: 0.12 } },
      ...(i < PHOTOS ? [{ id: 'shot', type: 'photo', label: 'Photo of the gauge', min: 1, max: 2 }] : []),
    ],
    computed: [{ id: 'angle', label: 'Squareness error over 100 mm', fn: 'squarenessError', args: { gap: { $input: 'gap' }, squareHeight: { $q: 150, unit: 'mm' } }, output: 'errorPer100mm', unit: 'mm', decimals: 3 }],
  }));
  const body = procedureSchema.parse({
    key: 'bench-guides',
    version: 4,
    title: 'Guide bearings: full check',
    intendedUse: 'Benchmark.',
    scope: 'Benchmark.',
    machineKind: 'horizontal_bandsaw',
    hazards: ['Sharp blade', 'Crushing between the bow and the bed', 'Automatic start-up'],
    ppe: [
      { level: 'mandatory', code: 'M004', text: 'Wear eye protection.' },
      { level: 'mandatory', code: 'M009', text: 'Wear protective gloves to handle the blade, only while isolated.' },
    ],
    steps,
  });
  const photos = new Map<string, { id: string; data: Buffer; width: number; height: number; sha256: string }>();
  const signedAt = new Date('2026-05-01T10:00:00Z');
  const entries = await Promise.all(
    body.steps.map(async (step, i) => {
      const values: Record<string, number | string[]> = { gap: 0.09 + (i % 4) * 0.01 };
      if (i < PHOTOS) {
        const id = `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`;
        photos.set(id, { id, data: await thumbnail(i), width: 320, height: 240, sha256: 'f'.repeat(64) });
        values['shot'] = [id];
      }
      const evaluation = evaluateStep(step, values, {});
      return {
        stepId: step.id,
        attempt: 1,
        values,
        evaluation,
        outcome: 'done' as const,
        correctiveNote: null,
        enteredBy: 'Ellis Marwood',
        witnessedBy: step.powered ? 'Dougal Pryce' : null,
        witnessedAt: step.powered ? signedAt : null,
        createdAt: signedAt,
      };
    }),
  );
  return {
    workshopName: 'Brackenford Fabrication Training Works',
    timeZone: 'Europe/London',
    checkUrl: 'https://setwright.example/records/0b1e6c1a-0000-4000-8000-000000000001/check',
    record: { id: '0b1e6c1a-0000-4000-8000-000000000001', status: 'signed_off', result: 'passed', createdAt: signedAt, finishedAt: signedAt, signedAt, recordHash: 'a'.repeat(64), previousHash: 'b'.repeat(64), voidReason: null },
    machine: { name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01', model: 'Corvane HB-260', location: 'Bay 2, cutting area' },
    procedure: { key: body.key, version: body.version, title: body.title, checksum: 'c'.repeat(64), body },
    startedBy: 'Ellis Marwood',
    entries,
    photos,
    signatures: [
      { meaning: 'performed', printedName: 'Ellis Marwood', signedAt, stepId: null },
      { meaning: 'witnessed', printedName: 'Dougal Pryce', signedAt, stepId: 'step-4' },
      { meaning: 'approved', printedName: 'Dougal Pryce', signedAt, stepId: null },
    ],
    returns: [],
    addenda: [],
  };
}

/** One string as our renderer drew it: its font, size and text. */
interface Drawn {
  font: string;
  size: number;
  text: string;
}

/** Every string our renderer draws for this record, captured once by watching pdfkit's text() calls. */
async function drawnBy(data: RecordPdfData): Promise<Drawn[]> {
  const proto = PDFDocument.prototype as unknown as { text: (...args: unknown[]) => unknown };
  const original = proto.text;
  const drawn: Drawn[] = [];
  proto.text = function (this: { _font: { name: string }; _fontSize: number }, text: unknown, ...rest: unknown[]) {
    drawn.push({ font: this._font.name, size: this._fontSize, text: String(text) });
    return original.call(this, text, ...rest);
  };
  try {
    await renderRecordPdf(data);
  } finally {
    proto.text = original;
  }
  return drawn;
}

/**
 * Bare pdfkit: the same fonts embedded, exactly the strings our renderer draws (same fonts and sizes)
 * and the same 12 images, flowed top to bottom with none of our layout (no measuring, tables, QR code or page furniture).
 */
function barePdfkit(data: RecordPdfData, drawn: Drawn[]): Promise<Buffer> {
  const fonts = pdfFonts();
  const doc = new PDFDocument({ size: 'A4', margins: { top: 62, bottom: 58, left: 48, right: 48 }, info: { CreationDate: data.record.signedAt! } });
  doc.registerFont('DejaVuSans', fonts.regular);
  doc.registerFont('DejaVuSans-Bold', fonts.bold);
  doc.registerFont('DejaVuSansMono', fonts.mono);
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((ok) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => ok(Buffer.concat(chunks)));
  });
  for (const d of drawn) doc.font(d.font).fontSize(d.size).text(d.text, { width: 499 });
  for (const photo of data.photos.values()) {
    if (doc.y + 90 > 780) doc.addPage();
    doc.image(photo.data, 48, doc.y, { fit: [112, 84] });
    doc.y += 90;
  }
  doc.end();
  return done;
}

async function benchPdf() {
  const data = await benchRecord();
  // BENCH_PDF_OUT=/tmp/record.pdf keeps one rendering to look at.
  if (process.env['BENCH_PDF_OUT']) writeFileSync(process.env['BENCH_PDF_OUT'], await renderRecordPdf(data));
  const drawn = await drawnBy(data);
  const ours: number[] = [];
  const bare: number[] = [];
  let size = 0;
  for (let i = 0; i < WARM_UP; i++) {
    await renderRecordPdf(data);
    await barePdfkit(data, drawn);
  }
  for (let i = 0; i < PDF_RUNS; i++) {
    let t = performance.now();
    size = (await renderRecordPdf(data)).length;
    ours.push(performance.now() - t);
    t = performance.now();
    await barePdfkit(data, drawn);
    bare.push(performance.now() - t);
  }
  const ratio = median(ours) / median(bare);
  console.log('');
  console.log(`record PDF: ${STEPS} steps, ${PHOTOS} photos, ${drawn.length} strings, ${PDF_RUNS} runs each after ${WARM_UP} warm-up (Node ${process.version})`);
  console.log(`  our renderer     median ${ms(median(ours))}   (min ${ms(Math.min(...ours))}, max ${ms(Math.max(...ours))}); ${(size / 1024).toFixed(0)} KB`);
  console.log(`  bare pdfkit      median ${ms(median(bare))}   (min ${ms(Math.min(...bare))}, max ${ms(Math.max(...bare))})`);
  console.log(`  ratio            ${ratio.toFixed(2)}   (goal ≤ ${GOAL_RATIO}) ${verdict(ratio <= GOAL_RATIO)}`);
  console.log(`  our time         ${ms(median(ours))}   (goal < ${GOAL_PDF_MS} ms) ${verdict(median(ours) < GOAL_PDF_MS)}`);
}

/** 100,000 records over three years on 50 machines, ~90 % signed off, with their signatures and 20 entries each. */
async function generate(adminUrl: string) {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    const t = performance.now();
    // Triggers off for the bulk load (the locks refuse entries on signed records); this database is thrown away.
    await client.query(`SET session_replication_role = replica`);
    await client.query(`
      INSERT INTO users (id, email, display_name, password_hash, active, created_at, updated_at)
      SELECT gen_random_uuid(), 'bench.person.' || g || '@bench.example', 'Bench Person ' || g, 'x', true, now(), now()
        FROM generate_series(1, 40) g;
      INSERT INTO machines (id, name, asset_tag, location, kind, model, spec, created_at, updated_at)
      SELECT gen_random_uuid(), 'Bench saw ' || lpad(g::text, 2, '0'), 'BENCH-' || g, 'Bench bay', 'horizontal_bandsaw', 'Bench HB', '{}', now(), now()
        FROM generate_series(1, 50) g;`);
    await client.query(`
      CREATE TEMP TABLE pick AS
        SELECT (SELECT array_agg(id) FROM machines) AS machines,
               (SELECT array_agg(id) FROM procedure_versions) AS versions,
               (SELECT array_agg(id) FROM users WHERE email LIKE 'bench.person.%') AS people;
      INSERT INTO setup_records (id, machine_id, procedure_version_id, machine_spec, status, result, started_by_id, finished_at,
                                 record_hash, previous_hash, signed_at, created_at, updated_at)
      SELECT gen_random_uuid(),
             p.machines[1 + (g % array_length(p.machines, 1))],
             p.versions[1 + ((g / 7) % array_length(p.versions, 1))],
             '{}',
             (CASE WHEN g % 10 < 9 THEN 'signed_off' WHEN g % 3 = 0 THEN 'underway' ELSE 'ready_for_signoff' END)::enum_setup_records_status,
             (CASE WHEN g % 10 = 9 AND g % 3 = 0 THEN NULL WHEN g % 13 = 0 THEN 'failed' ELSE 'passed' END)::enum_setup_records_result,
             p.people[1 + (g % array_length(p.people, 1))],
             c.at + interval '40 minutes',
             CASE WHEN g % 10 < 9 THEN md5(g::text) || md5('r' || g) END,
             CASE WHEN g % 10 < 9 THEN md5((g - 1)::text) || md5('r' || (g - 1)) END,
             CASE WHEN g % 10 < 9 THEN c.at + interval '2 hours' END,
             c.at, c.at
        FROM generate_series(1, ${RECORDS}) g, pick p,
             LATERAL (SELECT now() - interval '3 years' + (g::double precision / ${RECORDS}) * interval '3 years' AS at) c;`);
    await client.query(`
      INSERT INTO signatures (id, record_id, signer_id, meaning, printed_name, signed_at)
      SELECT gen_random_uuid(), r.id, r.started_by_id, 'performed', u.display_name, r.finished_at
        FROM setup_records r JOIN users u ON u.id = r.started_by_id WHERE r.finished_at IS NOT NULL AND u.email LIKE 'bench.%';
      INSERT INTO signatures (id, record_id, signer_id, meaning, printed_name, signed_at)
      SELECT gen_random_uuid(), r.id, a.id, 'approved', a.display_name, r.signed_at
        FROM setup_records r
        JOIN LATERAL (SELECT id, display_name FROM users WHERE email LIKE 'bench.%' AND id <> r.started_by_id ORDER BY md5(r.id::text || id::text) LIMIT 1) a ON true
       WHERE r.status = 'signed_off';`);
    await client.query(`
      INSERT INTO step_entries (id, record_id, step_id, attempt, values, evaluation, outcome, entered_by_id, idempotency_key, created_at)
      SELECT gen_random_uuid(), r.id, 'step-' || s, 1, jsonb_build_object('reading', 700 + s),
             '{"inputs":[],"computed":[],"complete":true,"outOfLimits":false,"missing":[]}'::jsonb, 'done', r.started_by_id, gen_random_uuid(), r.created_at
        FROM setup_records r, generate_series(1, ${ENTRIES_PER_RECORD}) s
`);
    await client.query(`SET session_replication_role = origin`);
    await client.query('VACUUM ANALYZE');
    const counts = await client.query<{ records: string; entries: string; signatures: string }>(
      `SELECT (SELECT count(*) FROM setup_records) AS records, (SELECT count(*) FROM step_entries) AS entries, (SELECT count(*) FROM signatures) AS signatures`,
    );
    const c = counts.rows[0]!;
    say(`generated ${Number(c.records).toLocaleString('en-GB')} records, ${Number(c.entries).toLocaleString('en-GB')} step entries, ${Number(c.signatures).toLocaleString('en-GB')} signatures in ${((performance.now() - t) / 1000).toFixed(0)} s`);
  } finally {
    await client.end();
  }
}

async function benchArchive(env: Record<string, string>) {
  await generate(env['DATABASE_ADMIN_URL']!);
  const { loadConfig } = await import('../../api/config');
  const { createDatabase } = await import('../../api/db/database');
  const { ArchiveRepository } = await import('../../api/modules/archive/repository');
  const { archiveQuerySchema } = await import('../../api/contracts/archive');
  const config = loadConfig({ ...process.env, ...env, LOG_LEVEL: 'silent' });
  const sequelize = createDatabase(config.DATABASE_URL, 4);
  try {
    const repo = new ArchiveRepository(sequelize);
    const [machine] = await sequelize.query<{ id: string }>(`SELECT id FROM machines WHERE asset_tag = 'BENCH-7'`, { type: QueryTypes.SELECT });
    const [procedure] = await sequelize.query<{ key: string }>(`SELECT key FROM procedure_versions ORDER BY key LIMIT 1`, { type: QueryTypes.SELECT });
    const from = new Date(Date.now() - 180 * 86_400_000).toISOString();
    const cases: [string, Record<string, string>][] = [
      ['default page (newest signature first, 25 rows + total)', {}],
      ['filtered: one machine, last 180 days, passed', { machineId: machine!.id, from, result: 'passed' }],
      ['filtered: one procedure, signed off, page 20', { procedure: procedure!.key, status: 'signed_off', page: '20' }],
      ['filtered: a person (performer or signer)', { person: 'Bench Person 17' }],
      ['sorted by machine, page 3', { sort: 'machine', dir: 'asc', page: '3' }],
    ];
    console.log('');
    console.log(`archive query: ${RECORDS.toLocaleString('en-GB')} records, ${(RECORDS * ENTRIES_PER_RECORD).toLocaleString('en-GB')} entries; ${QUERY_RUNS} runs each (page query and count together)`);
    for (const [label, raw] of cases) {
      const q = archiveQuerySchema.parse(raw);
      for (let i = 0; i < 10; i++) await repo.page(q);
      const times: number[] = [];
      let total = 0;
      for (let i = 0; i < QUERY_RUNS; i++) {
        const t = performance.now();
        total = (await repo.page(q)).total;
        times.push(performance.now() - t);
      }
      const goal = label.startsWith('default') || label.startsWith('filtered: one machine') ? `  (goal ≤ ${GOAL_QUERY_MS} ms) ${verdict(p95(times) <= GOAL_QUERY_MS)}` : '';
      console.log(`  ${label.padEnd(58)} p95 ${ms(p95(times)).padStart(9)}  median ${ms(median(times)).padStart(9)}  ${total.toLocaleString('en-GB')} rows${goal}`);
    }
  } finally {
    await sequelize.close();
  }
}

const tmp = mkdtempSync(join(tmpdir(), 'setwright-bench-'));
chmodSync(tmp, 0o755); // the postgres user must reach the cluster folder inside it
let stack: Stack | undefined;
const only = process.env['BENCH_ONLY']; // 'pdf' or 'archive' to run one half
try {
  if (only !== 'archive') await benchPdf();
  if (only !== 'pdf') await archivePart();
} catch (err) {
  console.error(`[setwright] the benchmark failed: ${(err as Error).stack ?? err}`);
  process.exitCode = 1;
} finally {
  stack?.stop();
  rmSync(tmp, { recursive: true, force: true });
}

async function archivePart() {
  stack = await startStack({
    pgDir: join(tmp, 'pg'),
    pgPort: await freePort(),
    s3Dir: join(tmp, 's3'),
    s3Port: await freePort(),
    apiPort: 0,
    secrets: throwawaySecrets(),
    nodeEnv: 'test',
  });
  await prepareDatabase(stack.env);
  await benchArchive(stack.env);
}
