import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { deleteDB } from 'idb';
import type { PhotoView } from '@setwright/contracts/photos';
import type { RecordDetail, StepEntryView } from '@setwright/contracts/records';
import { procedureSchema } from '@setwright/procedures/schema';
import { problemInterceptor, tokenInterceptor } from '../interceptors';
import { Session } from '../session';
import { OFFLINE_DB_NAME, OfflineDb } from './offline-db';
import { OUTBOX_TIMING, Outbox, retryDelay } from './outbox';
import { recordKey, type EntryItem } from './outbox-items';

// The queue against the real IndexedDB of the Karma Chromium; the API is HttpTestingController.
const USER = { id: 'a0000000-0000-4000-8000-000000000001', email: 'ellis@tests.example', displayName: 'Ellis Marsh', roles: ['trainee' as const] };
const RECORD = 'b0000000-0000-4000-8000-000000000001';
const TIMING = { firstRetryMs: 40, maxRetryMs: 160, requestTimeoutMs: 5000, photoTimeoutMs: 5000 };

const body = procedureSchema.parse({
  key: 'queue-fixture',
  version: 1,
  title: 'Queue fixture',
  intendedUse: 'Tests.',
  scope: 'Tests.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  steps: [
    { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] },
    { id: 'inspect', title: 'Inspect the old blade', kind: 'check', instruction: 'Look.', inputs: [{ id: 'wear', type: 'photo', label: 'Photo of the wear', max: 2 }] },
  ],
});

function record(status: RecordDetail['status'], entries: StepEntryView[] = []): RecordDetail {
  return {
    id: RECORD,
    status,
    result: null,
    machine: { id: 'c0000000-0000-4000-8000-000000000001', name: 'Bay 2 bandsaw', assetTag: 'SAW-02' },
    procedure: { id: 'd0000000-0000-4000-8000-000000000001', key: body.key, version: 1, title: body.title },
    startedBy: { id: USER.id, displayName: USER.displayName },
    createdAt: '2026-03-02T08:00:00.000Z',
    finishedAt: null,
    procedureBody: body,
    machineSpec: {},
    entries,
    voidReason: null,
  };
}

let attempts = 0;
function stored(req: EntryItem['request'], by = USER): StepEntryView {
  return {
    id: crypto.randomUUID(),
    stepId: req.stepId,
    attempt: ++attempts,
    values: req.values,
    evaluation: { inputs: [], computed: [], complete: true, outOfLimits: false, missing: [] },
    outcome: 'done',
    correctiveNote: null,
    enteredBy: { id: by.id, displayName: by.displayName },
    witnessedBy: null,
    witnessedAt: null,
    idempotencyKey: req.idempotencyKey,
    createdAt: new Date().toISOString(),
  };
}

function photoView(id: string): PhotoView {
  const r = { url: `/api/photos/${id}/thumb`, type: 'image/jpeg' as const, width: 320, height: 240, bytes: 10, sha256: 'ab'.repeat(32) };
  return { id, ownerId: USER.id, createdAt: new Date().toISOString(), original: { type: 'image/jpeg', bytes: 7, width: 4, height: 3, sha256: 'cd'.repeat(32) }, display: r, thumb: r, attachedRecordId: null, attachedAt: null };
}

const preview = { evaluation: { inputs: [], computed: [], complete: true, outOfLimits: false, missing: [] }, outcome: 'done' as const };
const entry = (stepId: string, values: EntryItem['request']['values']): EntryItem['request'] => ({ idempotencyKey: crypto.randomUUID(), stepId, values });
const offline = () => window.dispatchEvent(new Event('offline'));
const online = () => window.dispatchEvent(new Event('online'));

/** Wait (for real: IndexedDB and timers) until the condition holds. */
async function until(what: string, ok: () => boolean, ms = 3000) {
  const end = Date.now() + ms;
  while (!ok()) {
    if (Date.now() > end) throw new Error(`timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 5));
  }
}

describe('Outbox (the queue on the device)', () => {
  let dbName: string;
  let http: HttpTestingController;
  let outbox: Outbox;
  /** Every request the queue made, in order, as "METHOD url". */
  let sent: string[];

  async function start(name = dbName) {
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: OFFLINE_DB_NAME, useValue: name },
        { provide: OUTBOX_TIMING, useValue: TIMING },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    const session = TestBed.inject(Session);
    const signingIn = session.signIn({ email: USER.email, password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: USER });
    await signingIn;
    outbox = TestBed.inject(Outbox);
    offline(); // nothing goes until a test says the network is back
    TestBed.tick();
    await until('the queue is loaded', () => outbox.loadedFor() === USER.id);
  }

  /** The next request the queue makes (waiting for it), answered by `answer`. */
  async function next(method: string, url: string, answer: (req: TestRequest) => void) {
    let found: TestRequest[] = [];
    await until(`${method} ${url}`, () => (found = http.match({ method, url })).length > 0);
    expect(found.length).withContext(`one ${method} ${url} at a time`).toBe(1);
    sent.push(`${method} ${url}`);
    answer(found[0]!);
  }
  const lost = (req: TestRequest) => req.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
  const problem = (req: TestRequest, status: number, detail: string) =>
    req.flush({ type: 'about:blank', title: 'Refused', status, detail }, { status, statusText: 'Refused', headers: { 'content-type': 'application/problem+json' } });

  beforeEach(async () => {
    dbName = `setwright-outbox-spec-${crypto.randomUUID()}`;
    attempts = 0;
    sent = [];
    await start();
  });

  afterEach(async () => {
    await TestBed.inject(OfflineDb).close();
    http.verify();
    TestBed.resetTestingModule();
    await deleteDB(dbName);
  });

  it('when a photo and two steps are kept offline, then on reconnect the photo goes first, then the steps in order, each with its own key and the photo’s server id', async () => {
    const localPhoto = await outbox.keepPhoto(new Blob([new Uint8Array([0xff, 0xd8, 0xff])], { type: 'image/jpeg' }), 'wear.jpg');
    const first = entry('isolate', { lock: 'Lock 4' });
    const second = entry('inspect', { wear: [localPhoto] });
    await outbox.keepEntry(RECORD, first, preview);
    await outbox.keepEntry(RECORD, second, preview);
    expect(outbox.waiting()).toBe(3);
    expect(http.match(() => true).length).withContext('nothing is sent while offline').toBe(0);

    online();
    const serverPhoto = 'e0000000-0000-4000-8000-0000000000f1';
    await next('POST', '/api/photos', (req) => {
      expect(((req.request.body as FormData).get('photo') as File).name).toBe('wear.jpg');
      req.flush(photoView(serverPhoto), { status: 201, statusText: 'Created' });
    });
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway')));
    const bodies: EntryItem['request'][] = [];
    for (let n = 0; n < 2; n++) {
      await next('POST', `/api/records/${RECORD}/entries`, (req) => {
        bodies.push(req.request.body);
        req.flush(stored(req.request.body), { status: 201, statusText: 'Created' });
      });
    }
    await until('the queue is empty', () => outbox.items().length === 0);

    expect(sent).toEqual(['POST /api/photos', `GET /api/records/${RECORD}`, `POST /api/records/${RECORD}/entries`, `POST /api/records/${RECORD}/entries`]);
    expect(bodies.map((b) => b.idempotencyKey)).toEqual([first.idempotencyKey, second.idempotencyKey]);
    expect(bodies[1]!.values).toEqual({ wear: [serverPhoto] });
    expect(outbox.serverPhotoId(localPhoto)).toBe(serverPhoto);
    const copy = await TestBed.inject(OfflineDb).record(recordKey(USER.id, RECORD));
    expect(copy!.detail.entries.map((e) => e.idempotencyKey)).toEqual([first.idempotencyKey, second.idempotencyKey]);
  });

  it('when the connection drops part-way, then the queue stops, retries by itself with a doubling delay, and goes on in order with the same keys', async () => {
    expect([1, 2, 3, 4, 9].map((n) => retryDelay(n, TIMING))).toEqual([40, 80, 160, 160, 160]);
    // Three attempts at the same step (a re-measure, then another).
    const [a, b, c] = [entry('isolate', { lock: 'Lock 4' }), entry('isolate', { lock: 'Lock 5' }), entry('isolate', { lock: 'Lock 6' })];
    for (const e of [a, b, c]) await outbox.keepEntry(RECORD, e, preview);

    online();
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway')));
    const keys: string[] = [];
    let first: StepEntryView | undefined;
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      keys.push(req.request.body.idempotencyKey);
      first = stored(req.request.body);
      req.flush(first, { status: 201, statusText: 'Created' });
    });
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      keys.push(req.request.body.idempotencyKey);
      lost(req);
    });
    await until('a retry is planned', () => outbox.nextTryIn() !== null);
    expect(outbox.nextTryIn()).toBe(40);
    expect(outbox.waiting()).toBe(2);

    // The automatic retry (no online event): still no server.
    await next('GET', `/api/records/${RECORD}`, lost);
    await until('the next retry is planned', () => outbox.nextTryIn() === 80);

    // The first attempt is on the server now and gone from the queue; it is ours, not a change made elsewhere.
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway', [first!])));
    for (let n = 0; n < 2; n++) {
      await next('POST', `/api/records/${RECORD}/entries`, (req) => {
        keys.push(req.request.body.idempotencyKey);
        req.flush(stored(req.request.body), { status: 201, statusText: 'Created' });
      });
    }
    await until('the queue is empty', () => outbox.items().length === 0);
    expect(keys).toEqual([a.idempotencyKey, b.idempotencyKey, b.idempotencyKey, c.idempotencyKey]);
    expect(outbox.conflicts()).toEqual([]);
    expect(outbox.nextTryIn()).toBeNull();
  });

  it('when the answer to a send was lost, then the replay with the same key is answered with the stored entry and kept once', async () => {
    const first = entry('isolate', { lock: 'Lock 4' });
    await outbox.keepEntry(RECORD, first, preview);
    online();
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway')));
    let onServer: StepEntryView | undefined;
    // The server stores it, but the answer never reaches the tablet.
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      onServer = stored(req.request.body);
      lost(req);
    });
    await until('a retry is planned', () => outbox.nextTryIn() !== null);
    // The record was read before the first save committed, so only the key tells them apart.
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway')));
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      expect(req.request.body.idempotencyKey).toBe(first.idempotencyKey);
      req.flush(onServer!, { status: 200, statusText: 'OK' }); // a repeated key: the entry already stored
    });
    await until('the queue is empty', () => outbox.items().length === 0);
    expect(outbox.deliveredFor(RECORD).map((e) => e.id)).toEqual([onServer!.id]);
    const copy = await TestBed.inject(OfflineDb).record(recordKey(USER.id, RECORD));
    expect(copy!.detail.entries.map((e) => e.id)).toEqual([onServer!.id]);

    // Once the server shows the entry, a later pass sends nothing for it at all.
    const again = entry('isolate', { lock: 'Lock 4' });
    await outbox.keepEntry(RECORD, again, preview);
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway', [onServer!, stored(again)])));
    await until('the queue is empty', () => outbox.items().length === 0);
    expect(sent.filter((s) => s.startsWith('POST')).length).toBe(2);
  });

  it('when the record was signed off meanwhile, then nothing is sent, the step waits for a decision, and it can be kept for reference or discarded', async () => {
    const first = entry('isolate', { lock: 'Lock 4' });
    await outbox.keepEntry(RECORD, first, preview);
    online();
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('signed_off')));
    await until('a conflict', () => outbox.conflicts().length === 1);
    const [conflict] = outbox.conflicts();
    expect(conflict!.problem!.reason).toBe('closed');
    expect(conflict!.problem!.detail).toContain('signed off');
    expect(outbox.waiting()).toBe(0);

    await outbox.keepForReference(conflict!.seq!);
    expect(outbox.conflicts().length).toBe(0);
    expect(outbox.forRecord(RECORD).map((i) => i.state)).toEqual(['kept']);
    expect((await TestBed.inject(OfflineDb).items(USER.id)).map((i) => i.state)).toEqual(['kept']);

    await outbox.discard(conflict!.seq!);
    expect(outbox.forRecord(RECORD)).toEqual([]);
    expect(await TestBed.inject(OfflineDb).items(USER.id)).toEqual([]);
    expect(sent).toEqual([`GET /api/records/${RECORD}`]);
  });

  it('when the server answers 409, then the step is a conflict; once the record is open again, "send again" sends it as a new attempt with its key', async () => {
    const first = entry('isolate', { lock: 'Lock 4' });
    await outbox.keepEntry(RECORD, first, preview);
    online();
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway')));
    await next('POST', `/api/records/${RECORD}/entries`, (req) => problem(req, 409, 'This record is ready for sign-off and can no longer be changed.'));
    await until('a conflict', () => outbox.conflicts().length === 1);
    expect(outbox.conflicts()[0]!.problem!.detail).toContain('ready for sign-off');

    // Sent back by the competent person: open again.
    const before = [stored(entry('isolate', { lock: 'L1' }))];
    const sendingAgain = outbox.sendAgain(outbox.conflicts()[0]!.seq!);
    await next('GET', `/api/records/${RECORD}?without=procedure`, (req) => req.flush(record('returned', before)));
    expect(await sendingAgain).toBeNull();
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('returned', before)));
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      expect(req.request.body.idempotencyKey).toBe(first.idempotencyKey);
      req.flush(stored(req.request.body), { status: 201, statusText: 'Created' });
    });
    await until('the queue is empty', () => outbox.items().length === 0);
  });

  it('when the same step was saved from another device meanwhile, then the tablet’s step is not sent over it, and the other steps still go', async () => {
    const mine = entry('isolate', { lock: 'Lock 4' });
    const other = entry('inspect', { wear: [] });
    await outbox.keepEntry(RECORD, mine, preview);
    await outbox.keepEntry(RECORD, other, preview);
    online();
    const elsewhere = stored(entry('isolate', { lock: 'Lock 9' }));
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway', [elsewhere])));
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      expect(req.request.body.stepId).toBe('inspect');
      req.flush(stored(req.request.body), { status: 201, statusText: 'Created' });
    });
    await until('one conflict and nothing waiting', () => outbox.conflicts().length === 1 && outbox.waiting() === 0);
    expect(outbox.conflicts()[0]!.problem!.reason).toBe('changed');
    expect(outbox.conflicts()[0]!.problem!.detail).toContain('another device by Ellis Marsh');
  });

  it('when the page is reloaded before the connection is back, then every kept item is still there, in order, and drains from the new page', async () => {
    const localPhoto = await outbox.keepPhoto(new Blob([new Uint8Array([1, 2, 3])], { type: 'image/jpeg' }), 'gauge.jpg');
    const first = entry('inspect', { wear: [localPhoto] });
    await outbox.keepEntry(RECORD, first, preview);
    // A new page: a fresh app on the same device database.
    await TestBed.inject(OfflineDb).close();
    http.verify();
    TestBed.resetTestingModule();
    await start(dbName);
    expect(outbox.items().map((i) => i.kind)).toEqual(['photo', 'entry']);
    expect(outbox.localPhoto(localPhoto)?.fileName).toBe('gauge.jpg');

    online();
    await next('POST', '/api/photos', (req) => req.flush(photoView('e0000000-0000-4000-8000-0000000000f2'), { status: 201, statusText: 'Created' }));
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(record('underway')));
    await next('POST', `/api/records/${RECORD}/entries`, (req) => {
      expect(req.request.body).toEqual({ ...first, values: { wear: ['e0000000-0000-4000-8000-0000000000f2'] } });
      req.flush(stored(req.request.body), { status: 201, statusText: 'Created' });
    });
    await until('the queue is empty', () => outbox.items().length === 0);
  });

  it('when a record is started offline, then its start goes first with the tablet’s id, and a photo only a kept step uses cannot be dropped', async () => {
    const detail = record('underway');
    await outbox.keepStart(detail);
    const localPhoto = await outbox.keepPhoto(new Blob([new Uint8Array([1])], { type: 'image/jpeg' }), 'a.jpg');
    await outbox.keepEntry(RECORD, entry('inspect', { wear: [localPhoto] }), preview);
    expect(outbox.isLocalOnly(RECORD)).toBeTrue();
    expect(await outbox.discardPhoto(localPhoto)).withContext('a kept step still uses it').toBeFalse();

    online();
    await next('POST', '/api/records', (req) => {
      expect(req.request.body).toEqual({ id: RECORD, machineId: detail.machine.id, procedureKey: body.key });
      req.flush(detail, { status: 201, statusText: 'Created' });
    });
    await next('POST', '/api/photos', (req) => req.flush(photoView('e0000000-0000-4000-8000-0000000000f3'), { status: 201, statusText: 'Created' }));
    await next('GET', `/api/records/${RECORD}`, (req) => req.flush(detail));
    await next('POST', `/api/records/${RECORD}/entries`, (req) => req.flush(stored(req.request.body), { status: 201, statusText: 'Created' }));
    await until('the queue is empty', () => outbox.items().length === 0);
    expect(outbox.isLocalOnly(RECORD)).toBeFalse();
  });
});
