import { HttpEventType, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component, provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { type HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import { provideRouter } from '@angular/router';
import type { PhotoView } from '@setwright/contracts/photos';
import { deleteDB } from 'idb';
import { problemInterceptor, tokenInterceptor } from '../../../core/interceptors';
import { OFFLINE_DB_NAME, OfflineDb } from '../../../core/offline/offline-db';
import { Outbox } from '../../../core/offline/outbox';
import { Session } from '../../../core/session';
import { PhotoCapture } from './photo-capture';
import { PhotoCaptureHarness } from './photo-capture-harness';

@Component({
  selector: 'sw-test-host',
  imports: [PhotoCapture],
  template: `<sw-photo-capture label="Tension gauge reading" [max]="max()" [(photos)]="photos" />`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Host {
  readonly max = signal(3);
  readonly photos = signal<string[]>([]);
}

const ID_A = '6f1c9a0e-2b1d-4c3e-9f00-0000000000a1';
const ID_B = '6f1c9a0e-2b1d-4c3e-9f00-0000000000b2';

function view(id: string): PhotoView {
  const rendition = (url: string, width: number, height: number) => ({ url, type: 'image/jpeg' as const, width, height, bytes: 1000, sha256: 'ab'.repeat(32) });
  return {
    id,
    ownerId: 'a0000000-0000-4000-8000-000000000001',
    createdAt: '2026-03-02T09:15:00.000Z',
    original: { type: 'image/jpeg', bytes: 2000, width: 4000, height: 3000, sha256: 'cd'.repeat(32) },
    display: rendition(`/api/photos/${id}/display`, 1600, 1200),
    thumb: rendition(`/api/photos/${id}/thumb`, 320, 240),
    attachedRecordId: null,
    attachedAt: null,
  };
}

const photoFile = (name = 'gauge.jpg') => new File([new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 1, 2, 3])], name, { type: 'image/jpeg' });
const bytesOf = async (blob: Blob) => Array.from(new Uint8Array(await blob.arrayBuffer()));
const sentFile = (req: TestRequest) => (req.request.body as FormData).get('photo') as File;
const thumbBlob = () => new Blob([new Uint8Array([0xff, 0xd8, 0xff, 0xdb])], { type: 'image/jpeg' });

describe('PhotoCapture', () => {
  let fixture: ComponentFixture<Host>;
  let loader: HarnessLoader;
  let capture: PhotoCaptureHarness;
  let http: HttpTestingController;
  let dbName: string;

  beforeEach(async () => {
    dbName = `setwright-photo-spec-${crypto.randomUUID()}`;
    TestBed.configureTestingModule({
      imports: [Host],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: OFFLINE_DB_NAME, useValue: dbName },
      ],
    });
    fixture = TestBed.createComponent(Host);
    loader = TestbedHarnessEnvironment.loader(fixture);
    capture = await loader.getHarness(PhotoCaptureHarness);
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(async () => {
    http.verify();
    await TestBed.inject(OfflineDb).close();
    TestBed.resetTestingModule();
    await deleteDB(dbName);
  });

  const expectUpload = (): TestRequest => http.expectOne({ method: 'POST', url: '/api/photos' });

  /** Take one photo and let the API accept it and send its thumbnail. */
  async function uploadOne(id: string, name?: string) {
    await capture.pick([photoFile(name)]);
    expectUpload().flush(view(id), { status: 201, statusText: 'Created' });
    http.expectOne({ method: 'GET', url: `/api/photos/${id}/thumb` }).flush(thumbBlob());
    await fixture.whenStable();
  }

  it('when a photo is taken, then it uploads with progress, then shows the thumbnail from the API and joins the value', async () => {
    expect(await capture.label()).toBe('Tension gauge reading');
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Take photo/ }))).not.toBeNull();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Choose from device/ }))).not.toBeNull();

    const file = photoFile('blade-gauge.jpg');
    await capture.pick([file]);
    const upload = expectUpload();
    const sent = sentFile(upload);
    expect(sent.name).toBe('blade-gauge.jpg');
    expect(await bytesOf(sent)).toEqual(await bytesOf(file));
    expect(upload.request.reportProgress).toBeTrue();

    upload.event({ type: HttpEventType.Sent });
    upload.event({ type: HttpEventType.UploadProgress, loaded: 40, total: 100 });
    const bar = await loader.getHarness(MatProgressBarHarness);
    expect(await bar.getValue()).toBe(40);
    expect(await capture.states()).toEqual(['uploading']);
    expect((await capture.messages())[0]).toContain('Uploading… 40%');
    const [localPreview] = await capture.previews();
    expect(localPreview).toMatch(/^blob:/);
    expect(fixture.componentInstance.photos()).toEqual([]);

    upload.flush(view(ID_A), { status: 201, statusText: 'Created' });
    http.expectOne({ method: 'GET', url: `/api/photos/${ID_A}/thumb` }).flush(thumbBlob());
    await fixture.whenStable();

    expect(await capture.states()).toEqual(['done']);
    expect((await capture.messages())[0]).toContain('Saved');
    const [thumbnail] = await capture.previews();
    expect(thumbnail).toMatch(/^blob:/);
    expect(thumbnail).not.toBe(localPreview);
    expect(await loader.getAllHarnesses(MatProgressBarHarness)).toEqual([]);
    expect(fixture.componentInstance.photos()).toEqual([ID_A]);
    expect(await capture.count()).toBe('1 of 3 photos.');
  });

  it('when nobody is signed in and the connection drops, then "No connection" and Retry show, and Retry sends the same file again', async () => {
    const file = photoFile('guide-gap.jpg');
    await capture.pick([file]);
    const first = expectUpload();
    const firstFile = sentFile(first);
    first.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    await fixture.whenStable();

    expect(await capture.states()).toEqual(['offline']);
    expect((await capture.messages())[0]).toContain('No connection.');
    expect(fixture.componentInstance.photos()).toEqual([]);

    const retry = await loader.getHarness(MatButtonHarness.with({ text: 'Retry' }));
    await retry.click();
    const again = expectUpload();
    const resent = sentFile(again);
    expect(resent.name).toBe('guide-gap.jpg');
    expect(resent.size).toBe(firstFile.size);
    expect(await bytesOf(resent)).toEqual(await bytesOf(file));
    expect(await capture.states()).toEqual(['uploading']);

    again.flush(view(ID_A), { status: 201, statusText: 'Created' });
    http.expectOne(`/api/photos/${ID_A}/thumb`).flush(thumbBlob());
    await fixture.whenStable();
    expect(await capture.states()).toEqual(['done']);
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: 'Retry' }))).toBeNull();
    expect(fixture.componentInstance.photos()).toEqual([ID_A]);
  });

  it('when a stored photo is removed, then DELETE goes to the API and the photo leaves the value', async () => {
    await uploadOne(ID_A);
    await uploadOne(ID_B, 'second.jpg');
    expect(fixture.componentInstance.photos()).toEqual([ID_A, ID_B]);

    const removeButtons = await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Remove' }));
    expect(removeButtons.length).toBe(2);
    await removeButtons[0]!.click();
    http.expectOne({ method: 'DELETE', url: `/api/photos/${ID_A}` }).flush(null, { status: 204, statusText: 'No Content' });
    await fixture.whenStable();

    expect(fixture.componentInstance.photos()).toEqual([ID_B]);
    expect(await capture.states()).toEqual(['done']);
    expect(await capture.count()).toBe('1 of 3 photos.');
  });

  it('when the API refuses the file, then its reason shows and nothing joins the value', async () => {
    await capture.pick([photoFile('notes.jpg')]);
    expectUpload().flush(
      {
        type: '/problems/not-a-photo',
        title: 'This file is not a photo',
        status: 415,
        detail: 'Setwright takes JPEG, PNG and WebP photos. This file is something else, whatever its name says.',
      },
      { status: 415, statusText: 'Unsupported Media Type', headers: { 'content-type': 'application/problem+json' } },
    );
    await fixture.whenStable();

    expect(await capture.states()).toEqual(['refused']);
    expect((await capture.messages())[0]).toContain('JPEG, PNG and WebP');
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: 'Retry' }))).toBeNull();
    expect(fixture.componentInstance.photos()).toEqual([]);

    // Removing a photo that was never stored asks nothing of the API (verify() checks).
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Remove' }))).click();
    expect(await capture.states()).toEqual([]);
  });

  it('when the field is full, then Take photo is gone until a photo is removed', async () => {
    fixture.componentInstance.max.set(1);
    await uploadOne(ID_A);
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Take photo/ }))).toBeNull();

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Remove' }))).click();
    http.expectOne({ method: 'DELETE', url: `/api/photos/${ID_A}` }).flush(null, { status: 204, statusText: 'No Content' });
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Take photo/ }))).not.toBeNull();
  });

  it('when a photo is retaken, then the new one takes its place and the old one is deleted', async () => {
    await uploadOne(ID_A);
    await uploadOne(ID_B, 'second.jpg');

    const retakes = await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Retake' }));
    await retakes[0]!.click();
    const newer = '6f1c9a0e-2b1d-4c3e-9f00-0000000000c3';
    await capture.pick([photoFile('again.jpg')]);
    const upload = expectUpload();
    expect(fixture.componentInstance.photos()).toEqual([ID_A, ID_B]);
    upload.flush(view(newer), { status: 201, statusText: 'Created' });
    http.expectOne({ method: 'DELETE', url: `/api/photos/${ID_A}` }).flush(null, { status: 204, statusText: 'No Content' });
    http.expectOne(`/api/photos/${newer}/thumb`).flush(thumbBlob());
    await fixture.whenStable();

    expect(fixture.componentInstance.photos()).toEqual([newer, ID_B]);
    expect(await capture.states()).toEqual(['done', 'done']);
  });

  it('when photo ids are set from outside, then their thumbnails are fetched and shown', async () => {
    fixture.componentInstance.photos.set([ID_A]);
    await fixture.whenStable();
    http.expectOne({ method: 'GET', url: `/api/photos/${ID_A}/thumb` }).flush(thumbBlob());
    await fixture.whenStable();
    expect(await capture.states()).toEqual(['done']);
    const [preview] = await capture.previews();
    expect(preview).toMatch(/^blob:/);
  });

  it('when there is no connection, then the photo is kept on this tablet under a local id that joins the value, and Remove drops it without asking the server', async () => {
    const signingIn = TestBed.inject(Session).signIn({ email: 'e@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 'e@tests.example', displayName: 'Ellis', roles: ['trainee'] } });
    await signingIn;
    window.dispatchEvent(new Event('offline'));
    const file = photoFile('wear.jpg');
    await capture.pick([file]);
    for (let i = 0; i < 100 && fixture.componentInstance.photos().length === 0; i++) await new Promise((r) => setTimeout(r, 10));
    await fixture.whenStable();

    http.expectNone({ method: 'POST', url: '/api/photos' });
    expect(await capture.states()).toEqual(['on-device']);
    expect((await capture.messages())[0]).toContain('Kept on this tablet');
    const [localId] = fixture.componentInstance.photos();
    expect(localId).toMatch(/^[0-9a-f-]{36}$/);
    const kept = TestBed.inject(Outbox).localPhoto(localId!);
    expect(kept!.fileName).toBe('wear.jpg');
    expect(await bytesOf(kept!.blob)).toEqual(await bytesOf(file));
    expect((await capture.previews())[0]).toMatch(/^blob:/);

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Remove' }))).click();
    for (let i = 0; i < 100 && TestBed.inject(Outbox).localPhoto(localId!); i++) await new Promise((r) => setTimeout(r, 10));
    expect(fixture.componentInstance.photos()).toEqual([]);
    expect(await TestBed.inject(OfflineDb).items('u1')).toEqual([]);
    window.dispatchEvent(new Event('online'));
  });
});
