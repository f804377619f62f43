import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import { ObjectStore } from '../../api/lib/object-store';
import type { Person } from '../../api/modules/people/repository';
import { pdfKey } from '../../api/modules/pdf/service';
import { SetupRecord } from '../../api/modules/records/model';
import { AuditEvent, RecordReturn, Signature } from '../../api/modules/signoff/model';
import { db, expectProblem, makePerson, PASSWORD, testApp, testConfig } from '../support/api';
import { binaryBody, embeddedFontCount, imageCount, pdfText } from '../support/pdf';
import { approve, fixture } from '../support/procedures';
import { freshMachine, RecordMaker } from '../support/records';

// The workshop prints times in a zone five and a half hours ahead of UTC here, so a time printed in UTC by mistake shows.
const settings = { WORKSHOP_TIME_ZONE: 'Asia/Kolkata', WORKSHOP_NAME: 'Ashgrove Saw Training Shed', PUBLIC_URL: 'https://setwright.ashgrove.example' };
const app = testApp(settings);
const store = new ObjectStore(testConfig());
let maker: RecordMaker;
let trainee: Person, otherTrainee: Person, competent: Person, auditor: Person;
let signedId: string;
let machine: Awaited<ReturnType<typeof freshMachine>>;


async function download(id: string, who: Person) {
  return request(app).get(`/api/records/${id}/pdf`).set(await maker.auth(who)).buffer(true).parse(binaryBody);
}

/** "2026-12-02 19:35:09 UTC+05:30": worked out here by adding the offset by hand, not with the app's formatter. */
function inKolkata(at: Date): string {
  return new Date(at.getTime() + 330 * 60_000).toISOString().slice(0, 19).replace('T', ' ') + ' UTC+05:30';
}

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Pdf Trainee');
  otherTrainee = await makePerson(['trainee'], 'Pdf Other Trainee');
  competent = await makePerson(['competent_person'], 'Pdf Competent');
  auditor = await makePerson(['auditor'], 'Pdf Auditor');
  const key = `pdf-${randomUUID().slice(0, 8)}`;
  await approve(fixture(key, 1, 'Tension check for the PDF'));
  maker = new RecordMaker(app, key);
  machine = await freshMachine('Pdf saw');
  signedId = await maker.signed({ performer: trainee, witness: competent, approver: competent, machineId: machine.id, firstReading: 650, reading: 820, photos: ['#3a5a78', '#a33b2a'] });
});

describe('the signed record PDF', () => {
  test('when a record is signed off, then its PDF is rendered once, kept in the object store and its key is on the record', async () => {
    const row = await SetupRecord.findByPk(signedId);
    assert.equal(row!.pdfKey, `records/${signedId}.pdf`);
    const stored = await store.head(row!.pdfKey!);
    assert.equal(stored?.contentType, 'application/pdf');
    assert.ok((stored?.contentLength ?? 0) > 1000);
  });

  test('when an auditor downloads it, then it is an attachment with a safe name, the stored bytes, and an audit event', async () => {
    const before = await AuditEvent.count({ where: { recordId: signedId, action: 'record.downloaded' } });
    const res = await download(signedId, auditor);
    assert.equal(res.status, 200);
    assert.equal(res.headers['content-type'], 'application/pdf');
    assert.equal(res.headers['x-content-type-options'], 'nosniff');
    assert.match(res.headers['content-disposition'], /^attachment; filename="[A-Za-z0-9._-]+\.pdf"$/);
    assert.ok(res.headers['content-disposition'].includes(machine.assetTag));
    const body = res.body as Buffer;
    assert.equal(body.subarray(0, 5).toString('latin1'), '%PDF-');
    const again = await download(signedId, auditor);
    assert.ok(body.equals(again.body as Buffer), 'the same stored file each time');
    const events = await AuditEvent.findAll({ where: { recordId: signedId, action: 'record.downloaded' }, order: [['id', 'ASC']] });
    assert.equal(events.length, before + 2);
    assert.equal(events.at(-1)!.actorId, auditor.id);
  });

  test('when its text is read back, then it shows the workshop, machine, procedure, every reading with its unit, both attempts, limits and results', async () => {
    const text = (await pdfText((await download(signedId, auditor)).body as Buffer)).join('\n');
    for (const expected of [
      'ASHGROVE SAW TRAINING SHED',
      machine.name,
      machine.assetTag,
      'Testbench HB-1',
      'Test bay 9',
      'Tension check for the PDF, version 1',
      'Gauge reading 650 kgf 700–900 kgf Out of limits',
      'Gauge reading 820 kgf 700–900 kgf Pass',
      'Attempt 1 of 2 — superseded by a later attempt',
      'Attempt 2 of 2 — the one that counts',
      'Corrective note: Gauge read low; re-tensioned the blade and measured again.',
      'Lock 7, tag T-0007',
      'Blade runs clear of the flange Yes',
      'Power on — witness needed',
      'Signed off',
      'Passed',
    ]) {
      assert.ok(text.includes(expected), `the PDF should show "${expected}"`);
    }
    // Stress = 820 kgf wheel load ÷ 2 strands × 9.80665 N/kgf ÷ (27 × 0.9 mm²) = 165.5 MPa (CHECKS.md, blade tension: strand tension = wheel load ÷ 2).
    assert.ok(text.includes('Stress in one strand (worked out) 165.5 MPa'), 'the computed stress with its unit');
    assert.match(text, /Sharp blade/);
    assert.match(text, /supports, and never replaces, local codes and regulations, the machine maker’s instructions/);
  });

  test('when its signatures are read back, then each shows meaning, printed name, and date and time with the zone offset (21 CFR 11.50)', async () => {
    const text = (await pdfText((await download(signedId, auditor)).body as Buffer)).join('\n');
    const signatures = await Signature.findAll({ where: { recordId: signedId }, order: [['signedAt', 'ASC']] });
    assert.equal(signatures.length, 3);
    const label = { performed: 'Performed by', witnessed: 'Witnessed by', approved: 'Approved by' } as const;
    for (const s of signatures) {
      const line = `${label[s.meaning]} ${s.printedName} ${inKolkata(s.signedAt)}`;
      assert.ok(text.includes(line), `the PDF should show "${line}"`);
    }
    const row = await SetupRecord.findByPk(signedId);
    assert.ok(text.includes(`SIGNED OFF\n${inKolkata(row!.signedAt!)}`), 'the sign-off time in the summary');
  });

  test('when its integrity block is read, then it carries the record hash, the previous hash, the Record check address and page x of y', async () => {
    const second = await maker.signed({ performer: trainee, witness: competent, approver: competent, machineId: machine.id });
    const first = await SetupRecord.findByPk(signedId);
    const row = await SetupRecord.findByPk(second);
    assert.equal(row!.previousHash, first!.recordHash);
    const pages = await pdfText((await download(second, auditor)).body as Buffer);
    const text = pages.join('\n');
    assert.ok(text.includes(row!.recordHash!), 'record hash');
    assert.ok(text.includes(first!.recordHash!), 'previous hash');
    assert.ok(text.includes(`https://setwright.ashgrove.example/records/${second}/check`), 'the Record check link the QR code holds');
    assert.ok(pages.length >= 2);
    pages.forEach((page, i) => assert.ok(page.includes(`Page ${i + 1} of ${pages.length}`), `page ${i + 1} is numbered`));
  });

  test('when the file is inspected, then it embeds the photo thumbnails as images and its fonts as font programs', async () => {
    const body = (await download(signedId, auditor)).body as Buffer;
    assert.equal(imageCount(body), 2, 'one image for each of the two photos');
    assert.ok(embeddedFontCount(body) >= 2, 'TrueType fonts embedded (/FontFile2)');
    assert.doesNotMatch(body.toString('latin1'), /\/BaseFont \/Helvetica/, 'no un-embedded standard fonts');
  });
});

describe('who may download it', () => {
  test('when another trainee asks, then it is a 403 problem and nothing is logged as downloaded', async () => {
    const before = await AuditEvent.count({ where: { recordId: signedId, action: 'record.downloaded' } });
    expectProblem(await download(signedId, otherTrainee), 403);
    assert.equal(await AuditEvent.count({ where: { recordId: signedId, action: 'record.downloaded' } }), before);
  });

  test('when the trainee who performed it asks, then they get it', async () => {
    const res = await download(signedId, trainee);
    assert.equal(res.status, 200);
  });

  test('when the record is not signed off yet, then it is a 409 problem and no PDF is stored', async () => {
    const id = await maker.ready({ performer: trainee, witness: competent });
    const problem = expectProblem(await download(id, auditor), 409);
    assert.match(problem.detail, /signed-off/);
    assert.equal(await store.head(pdfKey(id, 0)), null);
    assert.equal((await SetupRecord.findByPk(id))!.pdfKey, null);
  });

  test('when the id is not a UUID, unknown, or nobody is signed in, then 400, 404 and 401 problems', async () => {
    const bad = expectProblem(await download('not-an-id', auditor), 400);
    assert.equal(bad.errors?.[0]?.pointer, '#/params/id');
    expectProblem(await download(randomUUID(), auditor), 404);
    expectProblem(await request(app).get(`/api/records/${signedId}/pdf`), 401);
  });
});

describe('when rendering fails at sign-off', () => {
  test('when the object store is down at sign-off, then the signature still stands and the first download renders and keeps the PDF', async () => {
    // The same database, but an object store that refuses connections.
    const broken = testApp({ ...settings, S3_ENDPOINT: 'http://127.0.0.1:9' });
    const brokenMaker = new RecordMaker(broken, maker.procedureKey);
    // Photos need the store, so the record is made through the working app and only signed through the broken one.
    const readyId = await maker.ready({ performer: trainee, witness: competent });
    const res = await request(broken).post(`/api/records/${readyId}/sign-off`).set(await brokenMaker.auth(competent)).send({ password: PASSWORD });
    assert.equal(res.status, 200, JSON.stringify(res.body));
    const row = await SetupRecord.findByPk(readyId);
    assert.equal(row!.status, 'signed_off');
    assert.equal(row!.pdfKey, null);
    const pdf = await download(readyId, auditor);
    assert.equal(pdf.status, 200);
    assert.equal((await SetupRecord.findByPk(readyId))!.pdfKey, pdfKey(readyId, 0));
    const stored = await store.getStream(pdfKey(readyId, 0));
    const chunks: Buffer[] = [];
    for await (const c of stored!.body) chunks.push(c as Buffer);
    assert.ok(Buffer.concat(chunks).equals(pdf.body as Buffer), 'what was sent is what was kept');
  });
});

describe('send-backs', () => {
  test('when a record was sent back before it was signed, then the PDF shows who sent it back, when and why', async () => {
    const id = await maker.ready({ performer: trainee, witness: competent });
    const reason = 'Re-measure the tension; the gauge photo is blurred.';
    await request(app).post(`/api/records/${id}/send-back`).set(await maker.auth(competent)).send({ reason }).expect(200);
    await request(app)
      .post(`/api/records/${id}/entries`)
      .set(await maker.auth(trainee))
      .send({ idempotencyKey: randomUUID(), stepId: 'tension', values: { reading: 810 } })
      .expect(201);
    await request(app).post(`/api/records/${id}/finish`).set(await maker.auth(trainee)).send({ password: PASSWORD }).expect(200);
    await request(app).post(`/api/records/${id}/sign-off`).set(await maker.auth(competent)).send({ password: PASSWORD }).expect(200);
    // One line of text whatever the wrapping: the reason may run onto a second line of its cell.
    const text = (await pdfText((await download(id, auditor)).body as Buffer)).join('\n').replace(/\s+/g, ' ');
    const [sentBack] = await RecordReturn.findAll({ where: { recordId: id } });
    assert.ok(text.includes(`${inKolkata(sentBack!.returnedAt)} Pdf Competent ${reason}`), 'date, who and why on one row');
    assert.ok(text.includes('Gauge reading 810 kgf 700–900 kgf Pass'), 'the corrected reading');
    assert.ok(text.includes('Gauge reading 800 kgf 700–900 kgf Pass'), 'and the reading before the send-back');
  });
});

describe('addenda', () => {
  test('when an addendum is signed, then the download carries it beside the unchanged signed PDF', async () => {
    const id = await maker.signed({ performer: trainee, witness: competent, approver: competent });
    const signedPdf = (await download(id, auditor)).body as Buffer;
    await request(app)
      .post(`/api/records/${id}/addenda`)
      .set(await maker.auth(competent))
      .send({ text: 'The gauge was recalibrated the next day; the reading stands.', password: PASSWORD })
      .expect(201);
    const withAddendum = (await download(id, auditor)).body as Buffer;
    const text = (await pdfText(withAddendum)).join('\n');
    assert.match(text, /The gauge was recalibrated the next day; the reading stands\./);
    assert.match(text, /Pdf Competent · \d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2} UTC\+05:30/);
    const row = await SetupRecord.findByPk(id);
    assert.equal(row!.pdfKey, pdfKey(id, 0), 'the record keeps the key of the PDF made at sign-off');
    const original = await store.getStream(pdfKey(id, 0));
    const chunks: Buffer[] = [];
    for await (const c of original!.body) chunks.push(c as Buffer);
    assert.ok(Buffer.concat(chunks).equals(signedPdf), 'the signed PDF itself is unchanged');
    assert.ok(await store.head(pdfKey(id, 1)), 'the copy with one addendum is kept beside it');
  });
});
