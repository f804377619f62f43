import { createHash } from 'node:crypto';
import type { Logger } from 'pino';
import sharp from 'sharp';
import type { Sequelize, Transaction } from 'sequelize';
import { evaluateStep, type EntryValues } from '../../procedures/engine';
import type { Config } from '../config';
import { ObjectStore } from '../lib/object-store';
import { BladeService } from '../modules/blades/service';
import { BladeFitting, BladeType } from '../modules/blades/model';
import { Authorisation } from '../modules/competencies/model';
import { Machine } from '../modules/machines/model';
import { findPersonByEmail, type Person } from '../modules/people/repository';
import { Photo } from '../modules/photos/model';
import { PhotoService } from '../modules/photos/service';
import { ProcedureVersion } from '../modules/procedures/model';
import { machineSnapshot, SetupRecord, StepEntry } from '../modules/records/model';
import { checkValues } from '../modules/records/values';
import { AuditEvent, RecordReturn, Signature } from '../modules/signoff/model';
import { sealRecord } from '../modules/signoff/service';
import { DEMO_MACHINES, DEMO_PEOPLE } from './seed';

// An invented six months of work on the two demo saws: signed, failed, returned and open records
// across every procedure of the bandsaw pack, the blades they fitted and took off, and the
// authorisations that followed. Every figure below is demo data. It is written through the
// product's own code (values checked and judged by the engine, records locked and chained by
// sign-off's sealRecord, fittings made by the blades module), so the Record check passes on it.

const DAY = 86_400_000;
const [ELLIS, NIA, DOUGAL, HARRIET, ROWAN] = DEMO_PEOPLE.map((p) => p.email) as [string, string, string, string, string];
void HARRIET; // the auditor reads; she performs nothing
const SAW1 = DEMO_MACHINES[0]!.assetTag;
const SAW2 = DEMO_MACHINES[1]!.assetTag;

/** The same UUID for the same demo name on every run, so the history is written once. */
export function demoId(name: string): string {
  const h = createHash('sha256').update(`setwright-demo-history/${name}`).digest('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-4${h.slice(13, 16)}-${((parseInt(h[16]!, 16) & 3) | 8).toString(16)}${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

type StepValues = Record<string, EntryValues>;
/** One step done again within the same record (a re-measurement after an out-of-limits reading). */
interface Attempt {
  stepId: string;
  values: EntryValues;
  note?: string;
}

interface PlannedRecord {
  name: string;
  machine: string;
  procedure: string;
  /** Days before the anchor day (the day of the first seeding). */
  day: number;
  hour: number;
  performer: string;
  signer?: string;
  witness?: string;
  values: StepValues;
  /** Corrective notes for the steps whose first reading is out of limits. */
  notes?: Record<string, string>;
  /** Second attempts, in order, after the first round of steps. */
  again?: Attempt[];
  /** Sent back with this reason, then these steps done again before it is finished anew. */
  returned?: { reason: string; by: string; redo: Attempt[] };
  /** How far it got: signed off (default), waiting for a signature, sent back and not yet corrected, underway, or voided. */
  ends?: 'signed' | 'ready' | 'returned' | 'underway' | 'voided';
  /** For 'underway': how many steps are done. */
  stepsDone?: number;
  voidReason?: string;
}

const isolate = (lock: string): EntryValues => ({ method: 'isolator', 'lock-id': lock, 'no-start': true });

function tension(kgf: number, lock: string): StepValues {
  return {
    isolate: isolate(lock),
    prepare: {},
    tension: { method: 'gauge', 'blade-type': 'bi-metal', 'gauge-reading': kgf },
    finish: { 'turned-over': true },
  };
}

function guides(fixed: number, movable: number, lock: string): StepValues {
  return {
    isolate: isolate(lock),
    prepare: { 'rollers-sound': true },
    'back-rollers': { 'fixed-guide': fixed, 'movable-guide': movable },
    'side-rollers': { 'side-touching': true },
    'hand-turn': { snagged: false },
    finish: { 'arm-set': true },
  };
}

function squareness(gapMm: number, variationMm: number, lock: string): StepValues {
  return {
    isolate: isolate(lock),
    prepare: {},
    measure: { gap: gapMm, 'square-height': 150 },
    'test-cut': { 'cut-ran-true': true },
    'test-piece': { 'bar-diameter': 60, 'thickness-variation': variationMm },
    finish: { 'left-ready': true },
  };
}

function descent(seconds: number, lock: string): StepValues {
  return { isolate: isolate(lock), prepare: {}, 'time-drop': { distance: 100, time: seconds }, finish: { 'arm-rested': true } };
}

function speedChange(material: string, sectionMm: number, stepLabel: string, deflectionMm: number, pulleys: [number, number], lock: string): StepValues {
  return {
    'choose-speed': { material, section: sectionMm, 'blade-type': 'bi-metal', cutting: 'coolant' },
    isolate: isolate(lock),
    'move-belt': { 'step-set': stepLabel, aligned: true },
    'belt-tension': { driver: pulleys[0], driven: pulleys[1], deflection: deflectionMm, 'not-over-tight': true },
    run: { 'no-slip': true },
    finish: { done: true },
  };
}

function bladeChange(lengthMm: number, pitch: string, lock: string, wear = 'even-wear'): StepValues {
  return {
    isolate: isolate(lock),
    'open-up': {},
    remove: {},
    'inspect-old': { wear, 'wear-note': wear === 'even-wear' ? 'Teeth dull along the whole length.' : 'Found after the blade snapped.' },
    clean: { 'clean-sound': true },
    'new-blade': { width: 27, thickness: 0.9, length: lengthMm, pitch, 'blade-type': 'bi-metal' },
    fit: { 'teeth-direction': true, seated: true },
    'turn-over': { 'turns-clean': true },
    'first-run': { 'runs-clear': true, 'sounds-right': true },
  };
}

function tracking(lock: string): StepValues {
  return {
    isolate: isolate(lock),
    prepare: {},
    'by-hand': { 'clear-by-hand': true },
    'under-power': { 'runs-clear': true },
    relock: isolate(lock),
    finish: { 'closed-up': true },
  };
}

function breakIn(areaCm2: number): StepValues {
  return {
    'set-up': {},
    'first-cut': { 'chips-right': true },
    progress: { diameter: 50, 'area-cut': areaCm2 },
    finish: { 'feed-raised': true, 'tension-rechecked': true },
  };
}

function lockout(keyHolder: string, lock: string): StepValues {
  return {
    'stop-and-rest': { stopped: true },
    isolate: { method: 'isolator', 'lock-id': lock, 'key-holder': keyHolder },
    prove: { 'no-start': true },
    photo: { 'lock-photo': [] },
    release: { 'guards-back': true },
  };
}

/** The invented history, oldest first. Each saw's blade tension creeps up and SAW-02's guides open up: the trends show both. */
export function demoHistory(): PlannedRecord[] {
  const r: PlannedRecord[] = [];
  const add = (p: PlannedRecord) => r.push(p);
  const len1 = DEMO_MACHINES[0]!.spec.bladeLengthMm;
  const len2 = DEMO_MACHINES[1]!.spec.bladeLengthMm;

  // Bay 2 bandsaw (SAW-01).
  add({ name: 's1-blade-1', machine: SAW1, procedure: 'blade-change', day: 178, hour: 9, performer: ELLIS, witness: DOUGAL, signer: DOUGAL, values: bladeChange(len1, '4/6', 'LK-07') });
  add({ name: 's1-tension-1', machine: SAW1, procedure: 'blade-tension', day: 178, hour: 11, performer: ELLIS, signer: DOUGAL, values: tension(852, 'LK-07') });
  add({ name: 's1-tracking-1', machine: SAW1, procedure: 'blade-tracking', day: 178, hour: 13, performer: ELLIS, witness: DOUGAL, signer: DOUGAL, values: tracking('LK-07') });
  add({ name: 's1-break-in-1', machine: SAW1, procedure: 'blade-break-in', day: 177, hour: 10, performer: NIA, witness: ROWAN, signer: ROWAN, values: breakIn(420) });
  add({ name: 's1-guides-1', machine: SAW1, procedure: 'guide-bearings', day: 160, hour: 10, performer: NIA, signer: DOUGAL, values: guides(0.1, 0.1, 'LK-07') });
  add({ name: 's1-tension-2', machine: SAW1, procedure: 'blade-tension', day: 150, hour: 9, performer: NIA, signer: ROWAN, values: tension(858, 'LK-07') });
  add({
    name: 's1-square-1', machine: SAW1, procedure: 'blade-squareness', day: 148, hour: 14, performer: DOUGAL, witness: ROWAN, signer: ROWAN,
    values: squareness(0.11, 0.12, 'LK-02'),
  });
  add({
    name: 's1-speed-1', machine: SAW1, procedure: 'speed-change', day: 145, hour: 10, performer: ELLIS, witness: ROWAN, signer: ROWAN,
    values: speedChange('low-carbon-steel', 40, '3', 6, [95, 95], 'LK-07'),
  });
  add({ name: 's1-descent-1', machine: SAW1, procedure: 'bow-descent', day: 130, hour: 11, performer: NIA, signer: DOUGAL, values: descent(52, 'LK-07') });
  add({ name: 's1-tension-3', machine: SAW1, procedure: 'blade-tension', day: 122, hour: 9, performer: ELLIS, signer: DOUGAL, values: tension(861, 'LK-07') });
  add({ name: 's1-blade-2', machine: SAW1, procedure: 'blade-change', day: 120, hour: 9, performer: NIA, witness: DOUGAL, signer: DOUGAL, values: bladeChange(len1, '4/6', 'LK-07') });
  add({ name: 's1-tension-4', machine: SAW1, procedure: 'blade-tension', day: 120, hour: 11, performer: NIA, signer: DOUGAL, values: tension(864, 'LK-07') });
  add({ name: 's1-tracking-2', machine: SAW1, procedure: 'blade-tracking', day: 120, hour: 13, performer: NIA, witness: DOUGAL, signer: ROWAN, values: tracking('LK-07') });
  add({ name: 's1-guides-2', machine: SAW1, procedure: 'guide-bearings', day: 115, hour: 14, performer: ELLIS, signer: ROWAN, values: guides(0.09, 0.1, 'LK-07') });
  add({ name: 's1-lockout-1', machine: SAW1, procedure: 'isolation-lockout', day: 100, hour: 8, performer: ELLIS, signer: DOUGAL, values: lockout('Ellis Marwood', 'LK-07') });
  add({
    name: 's1-tension-5', machine: SAW1, procedure: 'blade-tension', day: 95, hour: 9, performer: ELLIS, signer: ROWAN, values: tension(915, 'LK-07'),
    notes: { tension: 'Gauge read 915 kgf after the blade was left tensioned over the weekend; backed off, reported to the competent person for a re-check tomorrow.' },
  });
  add({ name: 's1-tension-6', machine: SAW1, procedure: 'blade-tension', day: 94, hour: 9, performer: DOUGAL, signer: ROWAN, values: tension(868, 'LK-02') });
  add({
    name: 's1-speed-2', machine: SAW1, procedure: 'speed-change', day: 93, hour: 10, performer: NIA, witness: DOUGAL, signer: DOUGAL,
    values: speedChange('stainless-304', 40, '3', 7, [95, 95], 'LK-07'),
  });
  add({
    name: 's1-square-2', machine: SAW1, procedure: 'blade-squareness', day: 90, hour: 10, performer: ELLIS, witness: DOUGAL, signer: ROWAN,
    values: squareness(0.21, 0.14, 'LK-07'),
    notes: { measure: 'Gap of 0.21 mm at the top of the square. Loosened the guide arm bolts, brought the blade square, tightened and measured again.' },
    again: [{ stepId: 'measure', values: { gap: 0.09, 'square-height': 150 } }],
  });
  add({ name: 's1-tension-7', machine: SAW1, procedure: 'blade-tension', day: 66, hour: 9, performer: NIA, signer: DOUGAL, values: tension(872, 'LK-07') });
  add({ name: 's1-blade-3', machine: SAW1, procedure: 'blade-change', day: 64, hour: 9, performer: ELLIS, witness: ROWAN, signer: ROWAN, values: bladeChange(len1, '3/4', 'LK-07') });
  add({
    name: 's1-tension-8', machine: SAW1, procedure: 'blade-tension', day: 64, hour: 11, performer: ELLIS, signer: DOUGAL, values: tension(876, 'LK-07'),
    returned: {
      reason: 'The lock number does not match the one on the isolator today (LK-07 is in the stores). Check which lock you used and save the isolation step again.',
      by: DOUGAL,
      redo: [{ stepId: 'isolate', values: isolate('LK-11') }],
    },
  });
  add({ name: 's1-tracking-3', machine: SAW1, procedure: 'blade-tracking', day: 64, hour: 13, performer: ELLIS, witness: ROWAN, signer: DOUGAL, values: tracking('LK-11') });
  add({ name: 's1-break-in-3', machine: SAW1, procedure: 'blade-break-in', day: 63, hour: 10, performer: ELLIS, witness: DOUGAL, signer: DOUGAL, values: breakIn(510) });
  add({
    name: 's1-speed-3', machine: SAW1, procedure: 'speed-change', day: 55, hour: 10, performer: ELLIS, witness: ROWAN, signer: ROWAN,
    values: speedChange('aluminium', 40, '4 (fastest)', 8, [120, 77], 'LK-11'),
  });
  add({ name: 's1-descent-2', machine: SAW1, procedure: 'bow-descent', day: 40, hour: 11, performer: ELLIS, signer: ROWAN, values: descent(48, 'LK-11') });
  add({ name: 's1-tension-9', machine: SAW1, procedure: 'blade-tension', day: 36, hour: 9, performer: NIA, signer: ROWAN, values: tension(880, 'LK-11') });
  add({ name: 's1-square-3', machine: SAW1, procedure: 'blade-squareness', day: 30, hour: 14, performer: NIA, witness: DOUGAL, signer: DOUGAL, values: squareness(0.08, 0.1, 'LK-11') });
  add({ name: 's1-guides-3', machine: SAW1, procedure: 'guide-bearings', day: 25, hour: 10, performer: NIA, signer: DOUGAL, values: guides(0.1, 0.11, 'LK-11') });
  add({ name: 's1-blade-4', machine: SAW1, procedure: 'blade-change', day: 20, hour: 9, performer: NIA, witness: DOUGAL, signer: ROWAN, values: bladeChange(len1, '4/6', 'LK-11') });
  add({ name: 's1-tension-10', machine: SAW1, procedure: 'blade-tension', day: 20, hour: 11, performer: NIA, signer: ROWAN, values: tension(885, 'LK-11') });
  add({ name: 's1-tension-11', machine: SAW1, procedure: 'blade-tension', day: 8, hour: 9, performer: ELLIS, signer: DOUGAL, values: tension(891, 'LK-11') });
  add({
    name: 's1-speed-4', machine: SAW1, procedure: 'speed-change', day: 2, hour: 10, performer: NIA, witness: DOUGAL,
    values: speedChange('medium-carbon-steel', 60, '2', 7, [80, 111], 'LK-11'), ends: 'ready',
  });
  add({
    name: 's1-descent-3', machine: SAW1, procedure: 'bow-descent', day: 2, hour: 14, performer: ELLIS, values: descent(41, 'LK-11'), ends: 'returned',
    returned: { reason: 'Time the drop again from the 100 mm mark with the stopwatch, not the phone clock, and save the reading step again.', by: DOUGAL, redo: [] },
  });

  // Stores bandsaw (SAW-02).
  add({ name: 's2-blade-1', machine: SAW2, procedure: 'blade-change', day: 172, hour: 9, performer: DOUGAL, witness: ROWAN, signer: ROWAN, values: bladeChange(len2, '3/4', 'LK-21') });
  add({ name: 's2-tension-1', machine: SAW2, procedure: 'blade-tension', day: 172, hour: 11, performer: DOUGAL, signer: ROWAN, values: tension(862, 'LK-21') });
  add({ name: 's2-tracking-1', machine: SAW2, procedure: 'blade-tracking', day: 172, hour: 13, performer: NIA, witness: DOUGAL, signer: DOUGAL, values: tracking('LK-21') });
  add({ name: 's2-guides-1', machine: SAW2, procedure: 'guide-bearings', day: 170, hour: 10, performer: ELLIS, signer: DOUGAL, values: guides(0.08, 0.08, 'LK-21') });
  add({ name: 's2-descent-1', machine: SAW2, procedure: 'bow-descent', day: 165, hour: 10, performer: ELLIS, signer: DOUGAL, values: descent(50, 'LK-21') });
  add({ name: 's2-tension-2', machine: SAW2, procedure: 'blade-tension', day: 142, hour: 9, performer: ELLIS, signer: DOUGAL, values: tension(866, 'LK-21') });
  add({ name: 's2-square-1', machine: SAW2, procedure: 'blade-squareness', day: 140, hour: 14, performer: ELLIS, witness: DOUGAL, signer: DOUGAL, values: squareness(0.1, 0.13, 'LK-21') });
  add({ name: 's2-guides-2', machine: SAW2, procedure: 'guide-bearings', day: 135, hour: 10, performer: NIA, signer: ROWAN, values: guides(0.09, 0.08, 'LK-21') });
  add({
    name: 's2-speed-1', machine: SAW2, procedure: 'speed-change', day: 125, hour: 10, performer: NIA, witness: ROWAN, signer: ROWAN,
    values: speedChange('low-carbon-steel', 50, '3', 7, [100, 100], 'LK-21'),
  });
  add({ name: 's2-descent-2', machine: SAW2, procedure: 'bow-descent', day: 120, hour: 10, performer: NIA, signer: ROWAN, values: descent(47, 'LK-21') });
  add({ name: 's2-tension-3', machine: SAW2, procedure: 'blade-tension', day: 112, hour: 9, performer: NIA, signer: ROWAN, values: tension(860, 'LK-21') });
  add({ name: 's2-blade-2', machine: SAW2, procedure: 'blade-change', day: 110, hour: 9, performer: ELLIS, witness: DOUGAL, signer: DOUGAL, values: bladeChange(len2, '3/4', 'LK-21', 'gullet-cracks') , notes: { 'inspect-old': 'The old blade snapped at a cracked gullet during a cut; the pieces were bagged and the break reported.' } });
  add({ name: 's2-tension-4', machine: SAW2, procedure: 'blade-tension', day: 110, hour: 11, performer: ELLIS, signer: DOUGAL, values: tension(864, 'LK-21') });
  add({ name: 's2-tracking-2', machine: SAW2, procedure: 'blade-tracking', day: 110, hour: 13, performer: ELLIS, witness: ROWAN, signer: ROWAN, values: tracking('LK-21') });
  add({ name: 's2-guides-3', machine: SAW2, procedure: 'guide-bearings', day: 100, hour: 10, performer: ELLIS, signer: DOUGAL, values: guides(0.1, 0.09, 'LK-21') });
  add({ name: 's2-lockout-1', machine: SAW2, procedure: 'isolation-lockout', day: 80, hour: 8, performer: NIA, signer: ROWAN, values: lockout('Nia Castellan', 'LK-21') });
  add({
    name: 's2-descent-3', machine: SAW2, procedure: 'bow-descent', day: 75, hour: 10, performer: ELLIS, signer: DOUGAL, values: descent(29, 'LK-21'),
    notes: { 'time-drop': 'The arm dropped 100 mm in 29 s, too fast. The damper valve was found turned fully open; reported, and the saw kept out of use until it is set.' },
  });
  add({ name: 's2-descent-4', machine: SAW2, procedure: 'bow-descent', day: 73, hour: 10, performer: DOUGAL, signer: ROWAN, values: descent(46, 'LK-24') });
  add({ name: 's2-tension-5', machine: SAW2, procedure: 'blade-tension', day: 70, hour: 9, performer: NIA, signer: DOUGAL, values: tension(870, 'LK-21') });
  add({ name: 's2-guides-4', machine: SAW2, procedure: 'guide-bearings', day: 66, hour: 10, performer: NIA, signer: ROWAN, values: guides(0.1, 0.1, 'LK-21') });
  add({
    name: 's2-speed-2', machine: SAW2, procedure: 'speed-change', day: 60, hour: 10, performer: ELLIS, witness: DOUGAL, signer: DOUGAL,
    values: speedChange('tool-steel', 30, '1 (slowest)', 8, [63, 140], 'LK-21'),
  });
  add({ name: 's2-blade-3', machine: SAW2, procedure: 'blade-change', day: 50, hour: 9, performer: NIA, witness: ROWAN, signer: ROWAN, values: bladeChange(len2, '4/6', 'LK-21') });
  add({ name: 's2-tension-6', machine: SAW2, procedure: 'blade-tension', day: 50, hour: 11, performer: NIA, signer: ROWAN, values: tension(868, 'LK-21') });
  add({ name: 's2-break-in-3', machine: SAW2, procedure: 'blade-break-in', day: 49, hour: 10, performer: NIA, witness: DOUGAL, signer: DOUGAL, values: breakIn(600) });
  add({ name: 's2-square-2', machine: SAW2, procedure: 'blade-squareness', day: 45, hour: 14, performer: DOUGAL, witness: ROWAN, signer: ROWAN, values: squareness(0.12, 0.15, 'LK-24') });
  add({ name: 's2-tension-7', machine: SAW2, procedure: 'blade-tension', day: 33, hour: 9, performer: ELLIS, signer: DOUGAL, values: tension(872, 'LK-21') });
  add({ name: 's2-guides-5', machine: SAW2, procedure: 'guide-bearings', day: 33, hour: 11, performer: ELLIS, signer: DOUGAL, values: guides(0.11, 0.1, 'LK-21') });
  add({ name: 's2-descent-5', machine: SAW2, procedure: 'bow-descent', day: 28, hour: 10, performer: NIA, signer: DOUGAL, values: descent(45, 'LK-21') });
  add({
    name: 's2-speed-3', machine: SAW2, procedure: 'speed-change', day: 15, hour: 10, performer: NIA, witness: ROWAN, signer: ROWAN,
    values: speedChange('low-carbon-steel', 50, '3', 8, [100, 100], 'LK-21'),
  });
  add({ name: 's2-tracking-void', machine: SAW2, procedure: 'blade-tracking', day: 12, hour: 9, performer: ELLIS, values: tracking('LK-21'), ends: 'voided', stepsDone: 2, voidReason: 'Started on the wrong saw; the tracking was done on the Bay 2 saw instead.' });
  add({ name: 's2-guides-6', machine: SAW2, procedure: 'guide-bearings', day: 6, hour: 10, performer: ELLIS, values: guides(0.11, 0.11, 'LK-21'), ends: 'ready' });
  add({ name: 's2-tracking-now', machine: SAW2, procedure: 'blade-tracking', day: 1, hour: 9, performer: NIA, values: tracking('LK-21'), ends: 'underway', stepsDone: 3 });
  return r;
}

/** Blade types on the stock list before the history starts (sizes fit both demo saws' wheels). */
const DEMO_BLADE_TYPES = [
  { widthMm: 27, thicknessMm: 0.9, lengthMm: DEMO_MACHINES[0]!.spec.bladeLengthMm, pitch: '4/6', material: 'bi-metal' as const, stock: 4, note: 'General work on the Bay 2 saw.' },
  { widthMm: 27, thicknessMm: 0.9, lengthMm: DEMO_MACHINES[0]!.spec.bladeLengthMm, pitch: '3/4', material: 'bi-metal' as const, stock: 2, note: 'Large solid sections.' },
  { widthMm: 27, thicknessMm: 0.9, lengthMm: DEMO_MACHINES[1]!.spec.bladeLengthMm, pitch: '3/4', material: 'bi-metal' as const, stock: 3, note: 'Stores saw, bar stock.' },
  { widthMm: 27, thicknessMm: 0.9, lengthMm: DEMO_MACHINES[1]!.spec.bladeLengthMm, pitch: '4/6', material: 'bi-metal' as const, stock: 3, note: 'Stores saw, tube and sections.' },
];

/** A plain picture standing in for the photo of a lock on an isolator (a yellow hasp on a grey box). */
async function lockPhoto(): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="640" height="480"><rect width="640" height="480" fill="#8a8f94"/>
    <rect x="200" y="80" width="240" height="320" rx="12" fill="#c9ccce"/><circle cx="320" cy="220" r="50" fill="#b23a2e"/>
    <rect x="290" y="300" width="60" height="70" rx="6" fill="#e8b71a"/><path d="M300 300 v-30 a20 20 0 0 1 40 0 v30" stroke="#333" stroke-width="8" fill="none"/></svg>`;
  return sharp(Buffer.from(svg)).jpeg({ quality: 80 }).toBuffer();
}

interface Ctx {
  sequelize: Sequelize;
  people: Map<string, Person>;
  machines: Map<string, Machine>;
  versions: Map<string, ProcedureVersion>;
  photos: PhotoService;
  anchor: number;
  /** The latest sign-off written on each machine: the next one is later, so the chain runs in time order. */
  lastSigned: Map<string, number>;
}

const minutes = (at: Date, n: number) => new Date(at.getTime() + n * 60_000);

async function event(action: string, actor: Person, recordId: string, at: Date, detail: Record<string, unknown>, transaction: Transaction) {
  await AuditEvent.create({ action, actorId: actor.id, recordId, detail, at }, { transaction });
}

/** Write one planned record as the product would have: entries judged by the engine, signatures, send-back, sign-off. */
async function writeRecord(ctx: Ctx, plan: PlannedRecord): Promise<void> {
  const id = demoId(plan.name);
  const machine = ctx.machines.get(plan.machine)!;
  const version = ctx.versions.get(plan.procedure)!;
  const performer = ctx.people.get(plan.performer)!;
  const witness = plan.witness ? ctx.people.get(plan.witness)! : performer;
  const steps = version.body.steps;
  const startedAt = new Date(ctx.anchor - plan.day * DAY + plan.hour * 3_600_000);
  const ends = plan.ends ?? 'signed';

  // A photo for each photo input that needs one (taken before the transaction: the object store is outside it).
  const values: StepValues = structuredClone(plan.values);
  for (const step of steps) {
    for (const input of step.inputs) {
      if (input.type !== 'photo' || input.min === 0) continue;
      const taken = await ctx.photos.ingest(performer, await lockPhoto());
      values[step.id] = { ...values[step.id], [input.id]: [taken.id] };
    }
  }

  await ctx.sequelize.transaction(async (transaction) => {
    const record = await SetupRecord.create(
      {
        id,
        machineId: machine.id,
        procedureVersionId: version.id,
        machineSpec: machine.spec,
        machineSnapshot: machineSnapshot(machine),
        status: 'underway',
        startedById: performer.id,
        createdAt: startedAt,
        updatedAt: startedAt,
      },
      { transaction },
    );
    await event('record.started', performer, id, startedAt, { machine: machine.assetTag, procedure: `${version.key} v${version.version}` }, transaction);

    let at = startedAt;
    const attempts = new Map<string, number>();
    const latest = new Map<string, 'done' | 'out_of_limits'>();
    const save = async (stepId: string, raw: EntryValues, note?: string) => {
      const step = steps.find((s) => s.id === stepId);
      if (!step) throw new Error(`demo history ${plan.name}: ${version.key} has no step ${stepId}`);
      const checked = checkValues(step, raw);
      const evaluation = evaluateStep(step, checked, machine.spec);
      if (!evaluation.complete) throw new Error(`demo history ${plan.name}: step ${stepId} misses ${evaluation.missing.join(', ')}`);
      const outcome = evaluation.outOfLimits ? 'out_of_limits' : 'done';
      if (outcome === 'out_of_limits' && !note) throw new Error(`demo history ${plan.name}: step ${stepId} is out of limits and has no corrective note`);
      at = minutes(at, 4);
      const attempt = (attempts.get(stepId) ?? 0) + 1;
      attempts.set(stepId, attempt);
      latest.set(stepId, outcome);
      const witnessed = step.powered ? witness : null;
      const entry = await StepEntry.create(
        {
          recordId: id,
          stepId,
          attempt,
          values: checked,
          evaluation,
          outcome,
          correctiveNote: outcome === 'out_of_limits' ? note! : null,
          enteredById: performer.id,
          witnessedById: witnessed?.id ?? null,
          witnessedAt: witnessed ? at : null,
          idempotencyKey: demoId(`${plan.name}/${stepId}/${attempt}`),
          createdAt: at,
        },
        { transaction },
      );
      const photoIds = step.inputs.filter((i) => i.type === 'photo').flatMap((i) => (checked[i.id] as string[] | undefined) ?? []);
      if (photoIds.length) await Photo.update({ attachedRecordId: id, attachedAt: at }, { where: { id: photoIds }, transaction });
      await event('step.saved', performer, id, at, { step: stepId, attempt, outcome }, transaction);
      if (witnessed && witnessed.id !== performer.id) {
        await Signature.create({ recordId: id, signerId: witnessed.id, meaning: 'witnessed', printedName: witnessed.displayName, signedAt: at, stepId, entryId: entry.id }, { transaction });
        await event('step.witnessed', witnessed, id, at, { step: stepId, attempt }, transaction);
      }
    };
    const finish = async () => {
      at = minutes(at, 6);
      const failed = steps.some((s) => latest.get(s.id) === 'out_of_limits');
      await record.update({ status: 'ready_for_signoff', result: failed ? 'failed' : 'passed', finishedAt: at, updatedAt: at }, { transaction });
      await Signature.create({ recordId: id, signerId: performer.id, meaning: 'performed', printedName: performer.displayName, signedAt: at, stepId: null, entryId: null }, { transaction });
      await event('record.finished', performer, id, at, { result: failed ? 'failed' : 'passed' }, transaction);
    };

    const doneSteps = ends === 'underway' || ends === 'voided' ? steps.slice(0, plan.stepsDone ?? 1) : steps;
    for (const step of doneSteps) await save(step.id, values[step.id] ?? {}, plan.notes?.[step.id]);
    for (const again of plan.again ?? []) await save(again.stepId, again.values, again.note);
    if (ends === 'underway') return;
    if (ends === 'voided') {
      at = minutes(at, 10);
      await record.update({ status: 'voided', voidReason: plan.voidReason ?? 'Abandoned.', updatedAt: at }, { transaction });
      await event('record.voided', performer, id, at, { reason: plan.voidReason }, transaction);
      return;
    }
    await finish();
    if (plan.returned) {
      const by = ctx.people.get(plan.returned.by)!;
      at = minutes(at, 90);
      await RecordReturn.create({ recordId: id, returnedById: by.id, reason: plan.returned.reason, returnedAt: at }, { transaction });
      await record.update({ status: 'returned', result: null, finishedAt: null, updatedAt: at }, { transaction });
      await event('record.returned', by, id, at, { reason: plan.returned.reason }, transaction);
      if (ends === 'returned') return;
      at = minutes(at, 30);
      for (const redo of plan.returned.redo) await save(redo.stepId, redo.values, redo.note);
      await record.update({ status: 'underway' }, { transaction });
      await finish();
    }
    if (ends === 'ready') return;
    const signer = ctx.people.get(plan.signer!)!;
    const signedAt = new Date(Math.max(minutes(at, 75).getTime(), (ctx.lastSigned.get(machine.id) ?? 0) + 60_000));
    await sealRecord(ctx.sequelize, record, signer, signedAt, transaction);
    ctx.lastSigned.set(machine.id, signedAt.getTime());
  });
}

/**
 * Write the invented six-month history once, after the demo people, machines and procedure packs
 * are in place. Records have fixed ids, so a second run finds them and changes nothing; the history
 * is dated back from the day it was first written.
 */
export async function seedDemoHistory(sequelize: Sequelize, config: Config, logger: Logger): Promise<{ written: number }> {
  const plans = demoHistory();
  const rows = await SetupRecord.findAll({ where: { id: plans.map((p) => demoId(p.name)) }, attributes: ['id', 'machineId', 'signedAt'] });
  if (rows.length === plans.length) return { written: 0 };
  const existing = new Set(rows.map((r) => r.id));

  const people = new Map<string, Person>();
  for (const p of DEMO_PEOPLE) people.set(p.email, (await findPersonByEmail(p.email))!);
  const machines = new Map((await Machine.findAll({ where: { assetTag: DEMO_MACHINES.map((m) => m.assetTag) } })).map((m) => [m.assetTag, m]));
  const versions = new Map((await ProcedureVersion.findAll({ where: { status: 'approved' } })).map((v) => [v.key, v]));
  // The anchor is the day the history was first written: a later run keeps the dates of the first.
  const first = await SetupRecord.findByPk(demoId(plans[0]!.name));
  const today = new Date();
  const anchor = first ? first.createdAt.getTime() + plans[0]!.day * DAY - plans[0]!.hour * 3_600_000 : Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), today.getUTCDate());
  const ctx: Ctx = { sequelize, people, machines, versions, anchor, lastSigned: new Map<string, number>(), photos: new PhotoService(new ObjectStore(config), config.PHOTO_MAX_PIXELS, logger) };

  for (const r of rows) {
    if (r.signedAt) ctx.lastSigned.set(r.machineId, Math.max(ctx.lastSigned.get(r.machineId) ?? 0, r.signedAt.getTime()));
  }
  for (const type of DEMO_BLADE_TYPES) {
    const { stock, note, ...where } = type;
    await BladeType.findOrCreate({ where, defaults: { ...where, stock, note, listed: true } });
  }
  const blades = new BladeService(sequelize, logger);
  let written = 0;
  // Oldest sign-off first on each machine, so each record chains to the one signed before it.
  for (const plan of plans) {
    const id = demoId(plan.name);
    if (!existing.has(id)) {
      await writeRecord(ctx, plan);
      written++;
    }
    if (plan.procedure === 'blade-change' && (plan.ends ?? 'signed') === 'signed') await blades.fitFromSignedRecord(id);
    if (plan.name === 's2-blade-1') await snappedBlade(ctx, plan);
  }
  await seedAuthorisations(ctx);
  return { written };
}

/** On the stores saw the first blade snapped before its replacement: taken off outside a blade change, with the reason. */
async function snappedBlade(ctx: Ctx, plan: PlannedRecord): Promise<void> {
  const fitting = await BladeFitting.findOne({ where: { recordId: demoId(plan.name) } });
  if (!fitting || fitting.removedAt) return;
  const at = new Date(ctx.anchor - 111 * DAY + 15 * 3_600_000);
  await fitting.update({ removedAt: at, removedById: ctx.people.get(DOUGAL)!.id, removalReason: 'broken', removalNote: 'Snapped at a cracked gullet while cutting 80 mm bar; saw isolated and the pieces bagged.', removalRecordId: null });
}

/** Authorisations granted by competent persons after witnessed runs: current, expiring soon, renewed and revoked ones. */
async function seedAuthorisations(ctx: Ctx): Promise<void> {
  const person = (email: string) => ctx.people.get(email)!.id;
  const date = (daysFromAnchor: number) => new Date(ctx.anchor + daysFromAnchor * DAY).toISOString().slice(0, 10);
  const at = (daysBefore: number) => new Date(ctx.anchor - daysBefore * DAY + 16 * 3_600_000);
  const grants: { who: string; key: string; by: string; grantedDaysAgo: number; expiresInDays: number; note: string; ended?: { daysAgo: number; kind: 'renewed' | 'revoked'; reason: string } }[] = [
    { who: ELLIS, key: 'blade-tension', by: DOUGAL, grantedDaysAgo: 120, expiresInDays: 245, note: 'After four witnessed runs on both saws.' },
    { who: ELLIS, key: 'blade-change', by: ROWAN, grantedDaysAgo: 60, expiresInDays: 305, note: 'Three witnessed blade changes, glove and blade-guard handling good.' },
    { who: ELLIS, key: 'guide-bearings', by: DOUGAL, grantedDaysAgo: 90, expiresInDays: 21, note: 'Feeler technique checked on the Bay 2 saw.' },
    { who: NIA, key: 'blade-tension', by: ROWAN, grantedDaysAgo: 100, expiresInDays: 265, note: 'Gauge method only.' },
    { who: NIA, key: 'blade-tracking', by: DOUGAL, grantedDaysAgo: 170, expiresInDays: 10, note: 'First authorisation.', ended: { daysAgo: 30, kind: 'renewed', reason: 'Renewed for a year after a witnessed run.' } },
    { who: NIA, key: 'blade-tracking', by: DOUGAL, grantedDaysAgo: 30, expiresInDays: 335, note: 'Renewed after a witnessed run on the stores saw.' },
    { who: NIA, key: 'bow-descent', by: DOUGAL, grantedDaysAgo: 140, expiresInDays: 225, note: 'Stopwatch method.', ended: { daysAgo: 74, kind: 'revoked', reason: 'Withdrawn after the stores saw was passed with the damper valve open; to be re-assessed.' } },
    { who: DOUGAL, key: 'speed-change', by: ROWAN, grantedDaysAgo: 150, expiresInDays: 580, note: 'Belt tension by deflection.' },
  ];
  for (const g of grants) {
    const grantedAt = at(g.grantedDaysAgo);
    const [row] = await Authorisation.findOrCreate({
      where: { personId: person(g.who), procedureKey: g.key, grantedAt },
      defaults: { personId: person(g.who), procedureKey: g.key, grantedById: person(g.by), grantedAt, expiresOn: date(g.expiresInDays), note: g.note },
    });
    if (g.ended && !row.endedAt) {
      await row.update({ endedAt: at(g.ended.daysAgo), endedById: person(g.by), endKind: g.ended.kind, endReason: g.ended.reason });
    }
  }
}
