import assert from 'node:assert/strict';
import { createHash, randomUUID } from 'node:crypto';
import { deflateSync } from 'node:zlib';
import { after, before, describe, test } from 'node:test';
import { DeleteObjectCommand, HeadObjectCommand, ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import type { Express } from 'express';
import pg from 'pg';
import sharp from 'sharp';
import request from 'supertest';
import { s3ClientConfig } from '../../api/lib/object-store';
import { Photo } from '../../api/modules/photos/model';
import { expectProblem, makePerson, signIn, testApp, testConfig } from '../support/api';

// ---------- the bucket, seen straight through the S3 API ----------

const config = testConfig();
const s3 = new S3Client(s3ClientConfig(config));
after(() => s3.destroy());

async function bucketKeys(): Promise<string[]> {
  const keys: string[] = [];
  let token: string | undefined;
  do {
    const page = await s3.send(new ListObjectsV2Command({ Bucket: config.S3_BUCKET, ContinuationToken: token }));
    keys.push(...(page.Contents ?? []).map((o) => o.Key!));
    token = page.IsTruncated ? page.NextContinuationToken : undefined;
  } while (token);
  return keys.sort();
}

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

// ---------- images made for the tests ----------

/** A photo-like JPEG: grey noise, so it compresses like a real one. */
function noiseJpeg(width: number, height: number): Promise<Buffer> {
  return sharp({ create: { width, height, channels: 3, background: '#7a7f84', noise: { type: 'gaussian', mean: 120, sigma: 40 } } })
    .jpeg({ quality: 90 })
    .toBuffer();
}

/** Red on the left half, blue on the right: shows which way the picture was turned. */
async function halvesJpeg(width: number, height: number): Promise<Buffer> {
  const blue = await sharp({ create: { width: width / 2, height, channels: 3, background: '#0000ff' } }).png().toBuffer();
  return sharp({ create: { width, height, channels: 3, background: '#ff0000' } })
    .composite([{ input: blue, left: width / 2, top: 0 }])
    .jpeg({ quality: 95 })
    .toBuffer();
}

const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
function crc32(bytes: Buffer): number {
  let c = 0xffffffff;
  for (const b of bytes) c = CRC_TABLE[(c ^ b) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
function pngChunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

/** A tiny, well-formed PNG whose header claims 100 000 × 100 000 pixels (a decompression bomb's calling card). */
function hugePngHeader(width = 100_000, height = 100_000): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr.writeUInt8(8, 8); // bit depth
  ihdr.writeUInt8(2, 9); // RGB
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    pngChunk('IHDR', ihdr),
    pngChunk('IDAT', deflateSync(Buffer.alloc(1024))),
    pngChunk('IEND', Buffer.alloc(0)),
  ]);
}

/** Walk the TIFF structure inside an EXIF block: does IFD0 point to a GPS IFD holding a latitude? */
function exifHasGpsLatitude(exif: Buffer): boolean {
  const tiff = exif.subarray(exif.indexOf('Exif\0\0', 0, 'latin1') + 6);
  const le = tiff.toString('latin1', 0, 2) === 'II';
  const u16 = (o: number) => (le ? tiff.readUInt16LE(o) : tiff.readUInt16BE(o));
  const u32 = (o: number) => (le ? tiff.readUInt32LE(o) : tiff.readUInt32BE(o));
  const entries = (ifd: number) => Array.from({ length: u16(ifd) }, (_, i) => ({ tag: u16(ifd + 2 + i * 12), value: u32(ifd + 2 + i * 12 + 8) }));
  const gps = entries(u32(4)).find((e) => e.tag === 0x8825);
  return !!gps && entries(gps.value).some((e) => e.tag === 0x0002);
}

// ---------- people and requests ----------

interface Signed {
  id: string;
  token: string;
}
let app: Express;
let trainee: Signed;
let otherTrainee: Signed;
let competent: Signed;
let auditor: Signed;
let admin: Signed;

async function person(roles: Parameters<typeof makePerson>[0], name: string): Promise<Signed> {
  const p = await makePerson(roles, name);
  return { id: p.id, token: (await signIn(app, p.email)).token };
}

before(async () => {
  app = testApp();
  trainee = await person(['trainee'], 'Photo Trainee');
  otherTrainee = await person(['trainee'], 'Photo Other Trainee');
  competent = await person(['competent_person'], 'Photo Competent');
  auditor = await person(['auditor'], 'Photo Auditor');
  admin = await person(['workshop_admin'], 'Photo Admin');
});

function upload(who: Signed, bytes: Buffer, filename = 'photo.jpg', contentType = 'image/jpeg', on: Express = app) {
  return request(on).post('/api/photos').set('authorization', `Bearer ${who.token}`).attach('photo', bytes, { filename, contentType });
}
const get = (who: Signed, path: string) => request(app).get(path).set('authorization', `Bearer ${who.token}`).buffer(true);

/** Run a request that must be refused, and prove it stored nothing: no row, no object. */
async function refusedWithoutTrace(send: () => Promise<request.Response>, status: number) {
  const keysBefore = await bucketKeys();
  const rowsBefore = await Photo.count();
  const res = await send();
  const problem = expectProblem(res, status);
  assert.ok(problem.detail.length > 10, 'the problem says why');
  assert.equal(await Photo.count(), rowsBefore, 'no photo row was written');
  assert.deepEqual(await bucketKeys(), keysBefore, 'no object was written');
  return problem;
}

// ---------- hostile and broken uploads ----------

describe('refusing bad uploads', () => {
  test('when the file is empty, then it is a 400 problem pointing at the photo field and nothing is stored', async () => {
    const problem = await refusedWithoutTrace(() => upload(trainee, Buffer.alloc(0)), 400);
    assert.equal(problem.errors?.[0]?.pointer, '#/photo');
    assert.match(problem.detail, /empty/);
  });

  test('when there is no photo field at all, then it is a 400 problem pointing at #/photo', async () => {
    const problem = await refusedWithoutTrace(
      () => request(app).post('/api/photos').set('authorization', `Bearer ${trainee.token}`).field('note', 'no file here'),
      400,
    );
    assert.equal(problem.errors?.[0]?.pointer, '#/photo');
  });

  test('when the body is JSON instead of a form, then it is a 400 problem pointing at #/photo', async () => {
    const problem = await refusedWithoutTrace(
      () => request(app).post('/api/photos').set('authorization', `Bearer ${trainee.token}`).send({ photo: 'data:image/jpeg;base64,AAAA' }),
      400,
    );
    assert.equal(problem.errors?.[0]?.pointer, '#/photo');
  });

  test('when the file comes in another field, then it is a 400 problem pointing at #/photo', async () => {
    const jpeg = await noiseJpeg(200, 150);
    const problem = await refusedWithoutTrace(
      () => request(app).post('/api/photos').set('authorization', `Bearer ${trainee.token}`).attach('picture', jpeg, 'photo.jpg'),
      400,
    );
    assert.equal(problem.errors?.[0]?.pointer, '#/photo');
  });

  test('when two photos come in one upload, then it is a 400 problem and neither is stored', async () => {
    const jpeg = await noiseJpeg(200, 150);
    const problem = await refusedWithoutTrace(
      () => request(app).post('/api/photos').set('authorization', `Bearer ${trainee.token}`).attach('photo', jpeg, 'a.jpg').attach('photo', jpeg, 'b.jpg'),
      400,
    );
    assert.equal(problem.errors?.[0]?.pointer, '#/photo');
  });

  test('when a JPEG is cut off half-way, then it is a 422 problem saying it is damaged and nothing is stored', async () => {
    const jpeg = await noiseJpeg(1200, 900);
    const problem = await refusedWithoutTrace(() => upload(trainee, jpeg.subarray(0, Math.floor(jpeg.length / 2))), 422);
    assert.equal(problem.type, '/problems/unreadable-photo');
    assert.match(problem.detail, /damaged or incomplete/);
  });

  test('when an HTML page with a script is renamed .jpg and declared image/jpeg, then it is a 415 problem', async () => {
    const html = Buffer.from('<!doctype html><html><body><script>fetch("/api/people/me")</script></body></html>');
    const problem = await refusedWithoutTrace(() => upload(trainee, html, 'blade.jpg', 'image/jpeg'), 415);
    assert.equal(problem.type, '/problems/not-a-photo');
  });

  test('when an SVG with a script is renamed .jpg, then it is a 415 problem (SVG is never decoded)', async () => {
    const svg = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="64" height="64"><script>alert(document.cookie)</script><rect width="64" height="64"/></svg>');
    const problem = await refusedWithoutTrace(() => upload(trainee, svg, 'guide.jpg', 'image/jpeg'), 415);
    assert.equal(problem.type, '/problems/not-a-photo');
  });

  test('when a file starts with JPEG bytes but the rest is HTML, then it is a 422 problem', async () => {
    const polyglot = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.from('<html><script>alert(1)</script></html>')]);
    const problem = await refusedWithoutTrace(() => upload(trainee, polyglot), 422);
    assert.equal(problem.type, '/problems/unreadable-photo');
  });

  test('when a real GIF is sent, then it is a 415 problem: only JPEG, PNG and WebP are taken', async () => {
    const gif = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#336699' } }).gif().toBuffer();
    const problem = await refusedWithoutTrace(() => upload(trainee, gif, 'photo.jpg', 'image/jpeg'), 415);
    assert.match(problem.detail, /JPEG, PNG and WebP/);
  });

  test('when a small PNG declares 100 000 × 100 000 pixels, then it is a 422 problem before any decoding and nothing is stored', async () => {
    const bomb = hugePngHeader();
    assert.ok(bomb.length < 2000, 'the file itself is tiny');
    assert.equal((await sharp(bomb, { limitInputPixels: false }).metadata()).width, 100_000, 'the crafted header reads as declared');
    const started = Date.now();
    const problem = await refusedWithoutTrace(() => upload(trainee, bomb, 'bomb.png', 'image/png'), 422);
    assert.equal(problem.type, '/problems/photo-too-many-pixels');
    assert.match(problem.detail, /100000 × 100000/);
    assert.ok(Date.now() - started < 5000, 'refused quickly, without decoding');
  });

  test('when the file is over the size limit, then it is a 413 problem and nothing is stored', async () => {
    const small = testApp({ PHOTO_MAX_BYTES: '20000' });
    const jpeg = await noiseJpeg(300, 200);
    assert.ok(jpeg.length > 20000 && jpeg.length < 80000, `test file is ${jpeg.length} bytes`);
    const problem = await refusedWithoutTrace(() => upload(trainee, jpeg, 'photo.jpg', 'image/jpeg', small), 413);
    assert.equal(problem.type, '/problems/photo-too-large');
    assert.equal(problem.errors?.[0]?.pointer, '#/photo');
  });

  test('when the upload declares a length far over the limit, then it is a 413 problem before the body is read', async () => {
    const small = testApp({ PHOTO_MAX_BYTES: '20000' });
    const jpeg = await noiseJpeg(900, 700);
    assert.ok(jpeg.length > 200_000, `test file is ${jpeg.length} bytes`);
    let res: request.Response | undefined;
    const problem = await refusedWithoutTrace(async () => (res = await upload(trainee, jpeg, 'photo.jpg', 'image/jpeg', small)), 413);
    assert.match(problem.detail, /MB/);
    assert.equal(res!.headers['connection'], 'close', 'refused from its declared length, and the connection closed');
  });

  test('when an auditor uploads, then it is a 403 problem: auditors only read', async () => {
    const jpeg = await noiseJpeg(200, 150);
    await refusedWithoutTrace(() => upload(auditor, jpeg), 403);
  });

  test('when nobody is signed in, then an upload is a 401 problem', async () => {
    const jpeg = await noiseJpeg(200, 150);
    await refusedWithoutTrace(() => request(app).post('/api/photos').attach('photo', jpeg, 'photo.jpg'), 401);
  });
});

// ---------- what is stored ----------

describe('storing a photo', () => {
  test('when the file name tries to climb folders, then the photo is stored under keys of our own', async () => {
    const jpeg = await noiseJpeg(640, 480);
    const res = await upload(trainee, jpeg, '../../../etc/passwd.jpg').expect(201);
    const keys = await bucketKeys();
    const mine = keys.filter((k) => k.includes(res.body.id));
    assert.deepEqual(mine, [`photos/${res.body.id}/display.jpg`, `photos/${res.body.id}/thumb.jpg`]);
    // Every key is one the API made: photo renditions, and the record PDFs kept beside them.
    const ours = /^(photos\/[0-9a-f-]{36}\/(display|thumb)\.jpg|records\/[0-9a-f-]{36}(\.pdf|\/with-\d+-addenda\.pdf))$/;
    assert.ok(keys.every((k) => ours.test(k)), keys.join(', '));
    const row = await Photo.findByPk(res.body.id);
    assert.ok(row);
    assert.doesNotMatch(JSON.stringify(row.get({ plain: true })), /passwd|\.\./);
  });

  test('when a JPEG carries GPS in its EXIF, then the stored renditions carry no metadata at all', async () => {
    const jpeg = await sharp(await noiseJpeg(1000, 750))
      .withExif({
        IFD0: { Make: 'Workshop tablet', Software: 'Camera' },
        IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '2/1 35/1 0/1' },
      })
      .jpeg()
      .toBuffer();
    const originalMeta = await sharp(jpeg).metadata();
    assert.ok(originalMeta.exif && exifHasGpsLatitude(originalMeta.exif), 'the uploaded file has a GPS latitude');

    const res = await upload(trainee, jpeg).expect(201);
    for (const which of ['display', 'thumb'] as const) {
      const stored = await get(trainee, `/api/photos/${res.body.id}/${which}`).expect(200);
      const meta = await sharp(stored.body).metadata();
      assert.equal(meta.exif, undefined, `${which} has no EXIF`);
      assert.equal(meta.xmp, undefined, `${which} has no XMP`);
      assert.equal(meta.iptc, undefined, `${which} has no IPTC`);
      assert.equal(meta.icc, undefined, `${which} has no ICC profile`);
      assert.equal(stored.body.indexOf('Exif'), -1, `${which} bytes hold no Exif block`);
    }
    assert.equal(res.body.original.sha256, sha256(jpeg), 'the hash is of the original bytes, GPS and all');
  });

  test('when a phone photo is landscape with EXIF orientation 6, then the renditions come out portrait and turned the right way', async () => {
    const jpeg = await sharp(await halvesJpeg(800, 600)).withMetadata({ orientation: 6 }).jpeg().toBuffer();
    const meta = await sharp(jpeg).metadata();
    assert.deepEqual([meta.width, meta.height, meta.orientation], [800, 600, 6]);

    const res = await upload(trainee, jpeg).expect(201);
    assert.deepEqual([res.body.original.width, res.body.original.height], [600, 800]);
    assert.deepEqual([res.body.display.width, res.body.display.height], [600, 800]);
    assert.deepEqual([res.body.thumb.width, res.body.thumb.height], [240, 320]);

    const display = await get(trainee, `/api/photos/${res.body.id}/display`).expect(200);
    const { data, info } = await sharp(display.body).raw().toBuffer({ resolveWithObject: true });
    assert.deepEqual([info.width, info.height], [600, 800]);
    assert.equal((await sharp(display.body).metadata()).orientation, undefined, 'no orientation tag is left to turn it again');
    const pixel = (x: number, y: number) => [...data.subarray((y * info.width + x) * 3, (y * info.width + x) * 3 + 3)];
    // Orientation 6 turns the picture a quarter clockwise: the left (red) half ends on top.
    const [r1, , b1] = pixel(300, 100);
    const [r2, , b2] = pixel(300, 700);
    assert.ok(r1! > 200 && b1! < 60, `top is red: ${pixel(300, 100)}`);
    assert.ok(b2! > 200 && r2! < 60, `bottom is blue: ${pixel(300, 700)}`);
  });

  test('when a PNG with transparency is sent, then both renditions are JPEG on a white ground', async () => {
    const png = await sharp({ create: { width: 500, height: 400, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } }).png().toBuffer();
    const res = await upload(trainee, png, 'screen.png', 'image/png').expect(201);
    assert.equal(res.body.original.type, 'image/png');
    const display = await get(trainee, res.body.display.url).expect(200);
    const meta = await sharp(display.body).metadata();
    assert.equal(meta.format, 'jpeg');
    assert.equal(meta.hasAlpha, false);
    const { dominant } = await sharp(display.body).stats();
    assert.ok(dominant.r > 240 && dominant.g > 240 && dominant.b > 240, `white ground: ${JSON.stringify(dominant)}`);
  });
});

// ---------- the round trip through the stand-in ----------

describe('the photo round trip', () => {
  test('when a 2400 × 1800 JPEG is uploaded, then the row, both objects and both renditions agree', async () => {
    const jpeg = await noiseJpeg(2400, 1800);
    const res = await upload(trainee, jpeg).expect(201);
    const body = res.body;
    assert.equal(res.headers['location'], `/api/photos/${body.id}`);
    assert.deepEqual(body.original, { type: 'image/jpeg', bytes: jpeg.length, width: 2400, height: 1800, sha256: sha256(jpeg) });
    assert.deepEqual([body.display.width, body.display.height, body.display.url], [1600, 1200, `/api/photos/${body.id}/display`]);
    assert.deepEqual([body.thumb.width, body.thumb.height, body.thumb.url], [320, 240, `/api/photos/${body.id}/thumb`]);
    assert.equal(body.ownerId, trainee.id);
    assert.equal(body.attachedRecordId, null);

    const row = (await Photo.findByPk(body.id))!;
    assert.equal(row.ownerId, trainee.id);
    assert.equal(row.sha256, sha256(jpeg));
    assert.equal(row.contentType, 'image/jpeg');
    assert.deepEqual([row.originalWidth, row.originalHeight, row.originalBytes], [2400, 1800, jpeg.length]);
    assert.equal(row.attachedRecordId, null);

    for (const which of ['display', 'thumb'] as const) {
      const rendition = body[which];
      const res = await get(trainee, rendition.url).expect(200);
      assert.equal(res.headers['content-type'], 'image/jpeg');
      assert.equal(res.headers['x-content-type-options'], 'nosniff');
      assert.match(String(res.headers['cache-control']), /^private, max-age=\d+$/);
      assert.equal(res.headers['etag'], `"${sha256(res.body)}"`, 'the ETag is the stored bytes’ hash');
      assert.equal(res.body.length, rendition.bytes);
      assert.equal(sha256(res.body), rendition.sha256);
      const meta = await sharp(res.body).metadata();
      assert.deepEqual([meta.format, meta.width, meta.height], ['jpeg', rendition.width, rendition.height]);

      const key = which === 'display' ? row.displayKey : row.thumbKey;
      const head = await s3.send(new HeadObjectCommand({ Bucket: config.S3_BUCKET, Key: key }));
      assert.equal(head.ContentType, 'image/jpeg');
      assert.equal(head.ContentLength, rendition.bytes);
      assert.equal(head.Metadata?.['sha256'], rendition.sha256);
    }

    const described = await get(trainee, `/api/photos/${body.id}`).expect(200);
    assert.deepEqual(described.body, body);
  });

  test('when a small photo is uploaded, then it is not enlarged', async () => {
    const jpeg = await noiseJpeg(200, 120);
    const res = await upload(trainee, jpeg).expect(201);
    assert.deepEqual([res.body.display.width, res.body.display.height], [200, 120]);
    assert.deepEqual([res.body.thumb.width, res.body.thumb.height], [200, 120]);
  });

  test('when the browser already holds a rendition, then If-None-Match gets a 304 with no body', async () => {
    const res = await upload(trainee, await noiseJpeg(400, 300)).expect(201);
    const first = await get(trainee, res.body.thumb.url).expect(200);
    const etag = String(first.headers['etag']);
    const again = await get(trainee, res.body.thumb.url).set('if-none-match', etag).expect(304);
    assert.equal(again.body.length ?? 0, 0);
    assert.equal(again.headers['etag'], etag);
    const listed = await get(trainee, res.body.thumb.url).set('if-none-match', `"somethingelse", ${etag}`).expect(304);
    assert.equal(listed.headers['etag'], etag);
    const stale = await get(trainee, res.body.thumb.url).set('if-none-match', '"0000"').expect(200);
    assert.equal(sha256(stale.body), res.body.thumb.sha256);
    // Each rendition has its own tag.
    const display = await get(trainee, res.body.display.url).set('if-none-match', etag).expect(200);
    assert.notEqual(display.headers['etag'], etag);
  });
});

// ---------- who sees and who removes ----------

describe('who may see a photo', () => {
  test('when another trainee or a competent person asks for an unattached photo, then it is a 403 problem', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    for (const who of [otherTrainee, competent, auditor, admin]) {
      for (const path of [`/api/photos/${res.body.id}`, res.body.display.url, res.body.thumb.url]) {
        const problem = expectProblem(await get(who, path), 403);
        assert.equal(problem.type, '/problems/not-allowed');
      }
    }
  });

  test('when the photo is attached to a record, then competent persons, auditors and admins see it, and other trainees still do not', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    // Attaching belongs to a later issue; set the row as that code will.
    const recordId = randomUUID();
    await Photo.update({ attachedRecordId: recordId, attachedAt: new Date() }, { where: { id: res.body.id } });
    for (const who of [competent, auditor, admin, trainee]) {
      const meta = await get(who, `/api/photos/${res.body.id}`).expect(200);
      assert.equal(meta.body.attachedRecordId, recordId);
      const thumb = await get(who, res.body.thumb.url).expect(200);
      assert.equal(sha256(thumb.body), res.body.thumb.sha256);
    }
    expectProblem(await get(otherTrainee, res.body.display.url), 403);
  });

  test('when the id is unknown, then it is a 404 problem; when it is not a UUID, a 400 pointing at the id', async () => {
    const unknown = randomUUID();
    for (const path of [`/api/photos/${unknown}`, `/api/photos/${unknown}/display`, `/api/photos/${unknown}/thumb`]) {
      expectProblem(await get(trainee, path), 404);
    }
    expectProblem(await request(app).delete(`/api/photos/${unknown}`).set('authorization', `Bearer ${trainee.token}`), 404);
    const bad = expectProblem(await get(trainee, '/api/photos/..%2F..%2Fetc/display'), 400);
    assert.equal(bad.errors?.[0]?.pointer, '#/params/id');
  });

  test('when nobody is signed in, then a rendition is a 401 problem', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    expectProblem(await request(app).get(res.body.thumb.url), 401);
  });
});

describe('removing a photo', () => {
  const remove = (who: Signed, id: string) => request(app).delete(`/api/photos/${id}`).set('authorization', `Bearer ${who.token}`);

  test('when its uploader removes an unattached photo, then the row and both objects are gone', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    const keys = [`photos/${res.body.id}/display.jpg`, `photos/${res.body.id}/thumb.jpg`];
    assert.deepEqual((await bucketKeys()).filter((k) => keys.includes(k)), keys);
    await remove(trainee, res.body.id).expect(204);
    assert.equal(await Photo.findByPk(res.body.id), null);
    assert.deepEqual((await bucketKeys()).filter((k) => k.includes(res.body.id)), []);
    expectProblem(await get(trainee, res.body.display.url), 404);
  });

  test('when someone else tries to remove it, then it is a 403 problem and everything stays', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    for (const who of [otherTrainee, admin, competent, auditor]) {
      const problem = expectProblem(await remove(who, res.body.id), 403);
      assert.ok(problem.detail.length > 10);
    }
    assert.ok(await Photo.findByPk(res.body.id));
    assert.equal((await bucketKeys()).filter((k) => k.includes(res.body.id)).length, 2);
  });

  test('when the photo is attached to a record, then even its uploader gets a 409 problem and it stays', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    await Photo.update({ attachedRecordId: randomUUID(), attachedAt: new Date() }, { where: { id: res.body.id } });
    const problem = expectProblem(await remove(trainee, res.body.id), 409);
    assert.match(problem.detail, /part of a record/);
    assert.ok(await Photo.findByPk(res.body.id));
    assert.equal((await bucketKeys()).filter((k) => k.includes(res.body.id)).length, 2);
  });
});

// ---------- failures half-way leave nothing behind ----------

describe('failures after the checks', () => {
  test('when the object store cannot be reached, then it is a 503 problem and no row is written', async () => {
    const dead = testApp({ S3_ENDPOINT: 'http://127.0.0.1:9' });
    const rowsBefore = await Photo.count();
    const problem = expectProblem(await upload(trainee, await noiseJpeg(300, 200), 'photo.jpg', 'image/jpeg', dead), 503);
    assert.equal(problem.type, '/problems/photo-store-unavailable');
    assert.equal(await Photo.count(), rowsBefore);
  });

  test('when the database refuses the row, then the objects already stored are removed again', async () => {
    const unlucky = await person(['trainee'], 'Photo Unlucky');
    const jpeg = await noiseJpeg(300, 200);
    // Behind the app's back: make the database refuse this one person's photos.
    const adminDb = new pg.Client({ connectionString: process.env['DATABASE_ADMIN_URL'] });
    await adminDb.connect();
    const constraint = `photos_test_refuse_${unlucky.id.replace(/-/g, '')}`;
    try {
      await adminDb.query(`ALTER TABLE photos ADD CONSTRAINT ${constraint} CHECK (owner_id <> '${unlucky.id}') NOT VALID`);
      const problem = await refusedWithoutTrace(() => upload(unlucky, jpeg), 500);
      assert.equal(problem.type, '/problems/server-error');
    } finally {
      await adminDb.query(`ALTER TABLE photos DROP CONSTRAINT IF EXISTS ${constraint}`);
      await adminDb.end();
    }
    // The refusal was the database's alone: without it the same upload goes through.
    await upload(unlucky, jpeg).expect(201);
  });

  test('when a rendition has vanished from the store behind the app, then it is a 500 problem that no browser may cache', async () => {
    const res = await upload(trainee, await noiseJpeg(300, 200)).expect(201);
    await s3.send(new DeleteObjectCommand({ Bucket: config.S3_BUCKET, Key: `photos/${res.body.id}/display.jpg` }));
    const missing = await get(trainee, res.body.display.url);
    const problem = expectProblem(missing, 500);
    assert.equal(problem.type, '/problems/photo-file-missing');
    assert.notEqual(missing.headers['etag'], `"${res.body.display.sha256}"`, 'not the rendition’s tag');
    assert.equal(missing.headers['cache-control'], 'no-store');
    // The thumbnail is still there and still served.
    await get(trainee, res.body.thumb.url).expect(200);
  });
});
