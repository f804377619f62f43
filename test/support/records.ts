import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import sharp from 'sharp';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import type { Person } from '../../api/modules/people/repository';
import { PASSWORD, signIn } from './api';

/** A machine of its own, so a test file's hash chain and archive rows are not shared with other files. */
export async function freshMachine(label = 'Test saw'): Promise<Machine> {
  const demo = DEMO_MACHINES[0]!;
  return Machine.create({
    ...demo,
    name: `${label} ${randomUUID().slice(0, 6)}`,
    assetTag: `T-${randomUUID().slice(0, 8)}`,
    model: 'Testbench HB-1',
    location: 'Test bay 9',
  });
}

/** A small JPEG of one colour, as a tablet would upload it. */
export function photoBytes(colour: string, width = 64, height = 48): Promise<Buffer> {
  return sharp({ create: { width, height, channels: 3, background: colour } }).jpeg().toBuffer();
}

export interface RecordOptions {
  performer: Person;
  /** The competent person who witnesses the powered step (when the performer is a trainee). */
  witness: Person;
  machineId?: string;
  /** The tension gauge reading that counts (kgf); below 700 leaves the record failed. */
  reading?: number;
  /** A first reading, out of limits with a corrective note, re-measured as `reading`. */
  firstReading?: number;
  /** Photo colours for the evidence step (the fixture takes one or two). */
  photos?: string[];
}

/**
 * Makes set-up records through the real API, on the fixture procedure of test/support/procedures.ts:
 * isolate → tension reading (with its computed stress) → powered tracking (witnessed) → photo evidence.
 */
export class RecordMaker {
  private readonly tokens = new Map<string, string>();

  constructor(
    readonly app: Express,
    readonly procedureKey: string,
  ) {}

  async auth(person: Person): Promise<{ authorization: string }> {
    let token = this.tokens.get(person.id);
    if (!token) {
      token = (await signIn(this.app, person.email)).token;
      this.tokens.set(person.id, token);
    }
    return { authorization: `Bearer ${token}` };
  }

  /** A record done and finished by the performer: ready for sign-off. */
  async ready(o: RecordOptions): Promise<string> {
    const as = await this.auth(o.performer);
    const machineId = o.machineId ?? (await freshMachine()).id;
    const reading = o.reading ?? 800;
    const started = await request(this.app).post('/api/records').set(as).send({ machineId, procedureKey: this.procedureKey }).expect(201);
    const id = started.body.id as string;
    const post = async (stepId: string, values: object, extra: object = {}) => {
      const res = await request(this.app).post(`/api/records/${id}/entries`).set(as).send({ idempotencyKey: randomUUID(), stepId, values, ...extra });
      assert.equal(res.status, 201, JSON.stringify(res.body));
    };
    await post('isolate', { lock: 'Lock 7, tag T-0007' });
    if (o.firstReading !== undefined) await post('tension', { reading: o.firstReading }, { correctiveNote: 'Gauge read low; re-tensioned the blade and measured again.' });
    await post('tension', { reading }, reading < 700 ? { correctiveNote: 'Tension would not hold; reported to the workshop admin.' } : {});
    const performerWitnesses = o.performer.roles.includes('competent_person');
    await post('track', { clear: true }, performerWitnesses ? {} : { witness: { email: o.witness.email, password: PASSWORD } });
    const shots: string[] = [];
    for (const colour of o.photos ?? ['#456']) {
      const upload = await request(this.app).post('/api/photos').set(as).attach('photo', await photoBytes(colour), 'gauge.jpg').expect(201);
      shots.push(upload.body.id as string);
    }
    await post('evidence', { shot: shots });
    await request(this.app).post(`/api/records/${id}/finish`).set(as).send({ password: PASSWORD, acceptFailed: reading < 700 }).expect(200);
    return id;
  }

  /** A record finished and then signed off by `approver`. */
  async signed(o: RecordOptions & { approver: Person }): Promise<string> {
    const id = await this.ready(o);
    const res = await request(this.app).post(`/api/records/${id}/sign-off`).set(await this.auth(o.approver)).send({ password: PASSWORD });
    assert.equal(res.status, 200, JSON.stringify(res.body));
    return id;
  }
}
