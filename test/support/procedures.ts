import { procedureSchema, type Procedure } from '../../procedures/schema';
import { procedureChecksum } from '../../api/modules/procedures/loader';
import { ProcedureVersion } from '../../api/modules/procedures/model';

/** A small procedure of our own for these tests, exercising each kind of input and a powered step. */
export function fixture(key: string, version = 1, title = 'Test tension check'): Procedure {
  return procedureSchema.parse({
    key,
    version,
    title,
    intendedUse: 'Checking the record rules in tests.',
    scope: 'Test machines only.',
    machineKind: 'horizontal_bandsaw',
    hazards: ['Sharp blade'],
    steps: [
      { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] },
      {
        id: 'tension',
        title: 'Read the tension gauge',
        kind: 'reading',
        instruction: 'Read the gauge.',
        inputs: [
          {
            id: 'reading',
            type: 'number',
            label: 'Gauge reading',
            unit: 'kgf',
            decimals: 0,
            limits: { min: { $spec: 'tensionRangeKgf.min', unit: 'kgf' }, max: { $spec: 'tensionRangeKgf.max', unit: 'kgf' } },
          },
        ],
        computed: [
          {
            id: 'stress',
            label: 'Stress in one strand',
            fn: 'bladeStress',
            args: { force: { $input: 'reading' }, reads: { $spec: 'tensionReads' }, width: { $spec: 'bladeWidthMm', unit: 'mm' }, thickness: { $spec: 'bladeThicknessMm', unit: 'mm' } },
            output: 'stress',
            unit: 'MPa',
            decimals: 1,
          },
        ],
      },
      { id: 'track', title: 'Track under power', kind: 'check', powered: true, instruction: 'Run it and watch.', inputs: [{ id: 'clear', type: 'yesno', label: 'Blade runs clear of the flange', expected: true }] },
      { id: 'evidence', title: 'Photo of the gauge', kind: 'photo', instruction: 'Take a photo.', inputs: [{ id: 'shot', type: 'photo', label: 'Gauge photo', min: 1, max: 2 }] },
    ],
  });
}

export async function approve(body: Procedure) {
  const current = await ProcedureVersion.findOne({ where: { key: body.key, status: 'approved' } });
  if (current) await current.update({ status: 'retired' });
  return ProcedureVersion.create({
    key: body.key,
    version: body.version,
    title: body.title,
    machineKind: body.machineKind,
    status: 'approved',
    body,
    checksum: procedureChecksum(body),
    source: 'pack',
    approvedAt: new Date(),
  });
}

