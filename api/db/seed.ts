import bcrypt from 'bcryptjs';
import type { Role } from '../contracts/roles';
import { ensureMachine, ensureSchedule } from '../modules/machines/repository';
import type { ScheduleTrigger } from '../contracts/schedules';
import { upsertPerson } from '../modules/people/repository';

/** The invented training workshop that the demo and the tests sign in to. */
export const DEMO_WORKSHOP = 'Brackenford Fabrication Training Works';
export const DEMO_PASSWORD = 'saw-demo-2026';

export const DEMO_PEOPLE: { email: string; displayName: string; roles: Role[] }[] = [
  { email: 'ellis.marwood@brackenford-works.example', displayName: 'Ellis Marwood', roles: ['trainee'] },
  { email: 'nia.castellan@brackenford-works.example', displayName: 'Nia Castellan', roles: ['trainee'] },
  { email: 'dougal.pryce@brackenford-works.example', displayName: 'Dougal Pryce', roles: ['competent_person'] },
  { email: 'harriet.quill@brackenford-works.example', displayName: 'Harriet Quill', roles: ['auditor'] },
  { email: 'rowan.tilsley@brackenford-works.example', displayName: 'Rowan Tilsley', roles: ['workshop_admin', 'competent_person'] },
];

/**
 * Two invented horizontal bandsaws. Figures follow common practice for saws of this class
 * (tension set by gauge at 700–900 kgf of wheel load, back-roller clearance 0.08–0.12 mm,
 * drive-belt deflection about 10 mm, four belt speeds); the rest is demo data.
 */
export const DEMO_MACHINES = [
  {
    name: 'Bay 2 bandsaw',
    assetTag: 'BFW-SAW-01',
    location: 'Bay 2, cutting area',
    kind: 'horizontal_bandsaw',
    model: 'Corvane HB-260',
    spec: {
      wheelDiameterMm: 300,
      centreDistanceMm: 900,
      bladeLengthMm: 2742,
      bladeWidthMm: 27,
      bladeThicknessMm: 0.9,
      tensionRangeKgf: { min: 700, max: 900 },
      tensionReads: 'wheel-load',
      guideClearanceMm: { min: 0.08, max: 0.12 },
      motorRpm: 1400,
      gearboxRatio: 30,
      speedSteps: [
        { label: '1 (slowest)', driverMm: 60, drivenMm: 133 },
        { label: '2', driverMm: 80, drivenMm: 111 },
        { label: '3', driverMm: 95, drivenMm: 95 },
        { label: '4 (fastest)', driverMm: 120, drivenMm: 77 },
      ],
      beltCentreDistanceMm: 420,
      beltDeflectionMm: 10,
    },
  },
  {
    name: 'Stores bandsaw',
    assetTag: 'BFW-SAW-02',
    location: 'Steel stores, by the racking',
    kind: 'horizontal_bandsaw',
    model: 'Corvane HB-320A',
    spec: {
      wheelDiameterMm: 350,
      centreDistanceMm: 1150,
      bladeLengthMm: 3400,
      bladeWidthMm: 27,
      bladeThicknessMm: 0.9,
      tensionRangeKgf: { min: 700, max: 900 },
      tensionReads: 'wheel-load',
      guideClearanceMm: { min: 0.08, max: 0.12 },
      motorRpm: 1420,
      gearboxRatio: 36,
      speedSteps: [
        { label: '1 (slowest)', driverMm: 63, drivenMm: 140 },
        { label: '2', driverMm: 80, drivenMm: 112 },
        { label: '3', driverMm: 100, drivenMm: 100 },
        { label: '4 (fastest)', driverMm: 125, drivenMm: 80 },
      ],
      beltCentreDistanceMm: 460,
      beltDeflectionMm: 10,
    },
  },
];

/** Check schedules on the demo saws (procedure keys from the bandsaw pack); common practice, not a rule. */
export const DEMO_SCHEDULES: { assetTag: string; procedureKey: string; intervalDays: number | null; triggers: ScheduleTrigger[] }[] = [
  { assetTag: 'BFW-SAW-01', procedureKey: 'blade-tension', intervalDays: 30, triggers: ['after_blade_change'] },
  { assetTag: 'BFW-SAW-01', procedureKey: 'guide-bearings', intervalDays: 90, triggers: ['after_relocation'] },
  { assetTag: 'BFW-SAW-01', procedureKey: 'blade-squareness', intervalDays: 180, triggers: ['after_relocation', 'after_failed_check'] },
  { assetTag: 'BFW-SAW-02', procedureKey: 'blade-tension', intervalDays: 30, triggers: ['after_blade_change'] },
  { assetTag: 'BFW-SAW-02', procedureKey: 'bow-descent', intervalDays: 90, triggers: [] },
];

/** Insert the demo workshop once; running it again changes nothing. */
export async function seedDemo(bcryptCost: number): Promise<void> {
  let hash: string | undefined;
  for (const person of DEMO_PEOPLE) {
    hash ??= await bcrypt.hash(DEMO_PASSWORD, bcryptCost);
    await upsertPerson({ ...person, passwordHash: hash });
  }
  const ids = new Map<string, string>();
  for (const machine of DEMO_MACHINES) {
    ids.set(machine.assetTag, (await ensureMachine(machine)).id);
  }
  for (const { assetTag, ...schedule } of DEMO_SCHEDULES) {
    await ensureSchedule({ machineId: ids.get(assetTag)!, ...schedule });
  }
}
