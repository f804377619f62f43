import { FormArray, FormControl, FormGroup, type AbstractControl } from '@angular/forms';
import type { MachineDetail, MachineRequestInput } from '@setwright/contracts/machines';
import type { TensionReads } from '@setwright/contracts/machine-spec';

const num = () => new FormControl<number | null>(null);
const range = () => new FormGroup({ min: num(), max: num() });

export function speedStepGroup(step?: { label: string; driverMm: number | null; drivenMm: number | null }) {
  return new FormGroup({
    label: new FormControl(step?.label ?? '', { nonNullable: true }),
    driverMm: new FormControl<number | null>(step?.driverMm ?? null),
    drivenMm: new FormControl<number | null>(step?.drivenMm ?? null),
  });
}
export type SpeedStepGroup = ReturnType<typeof speedStepGroup>;

/**
 * The register form, shaped like the request so a problem's pointer ('#/spec/tensionRangeKgf/max')
 * names its control. Numbers start empty; the shared schema says what is missing.
 */
export function machineForm() {
  return new FormGroup({
    name: new FormControl('', { nonNullable: true }),
    assetTag: new FormControl('', { nonNullable: true }),
    location: new FormControl('', { nonNullable: true }),
    kind: new FormControl<'horizontal_bandsaw'>('horizontal_bandsaw', { nonNullable: true }),
    model: new FormControl('', { nonNullable: true }),
    photoId: new FormControl<string | null>(null),
    spec: new FormGroup({
      wheelDiameterMm: num(),
      centreDistanceMm: num(),
      bladeLengthMm: num(),
      bladeWidthMm: num(),
      bladeThicknessMm: num(),
      tensionRangeKgf: range(),
      tensionReads: new FormControl<TensionReads | null>(null),
      guideClearanceMm: range(),
      motorRpm: num(),
      gearboxRatio: num(),
      speedSteps: new FormArray<SpeedStepGroup>([speedStepGroup()]),
      beltCentreDistanceMm: num(),
      beltDeflectionMm: num(),
    }),
  });
}
export type MachineForm = ReturnType<typeof machineForm>;

/** Fill the form from a stored machine (a figure the register lacks stays empty). */
export function fillMachineForm(form: MachineForm, m: MachineDetail) {
  const spec = m.spec as Partial<Record<string, unknown>> & { speedSteps?: { label: string; driverMm: number; drivenMm: number }[] };
  const steps = form.controls.spec.controls.speedSteps;
  steps.clear();
  for (const s of spec.speedSteps?.length ? spec.speedSteps : [undefined]) steps.push(speedStepGroup(s));
  const { speedSteps: _steps, ...rest } = spec;
  form.patchValue({ name: m.name, assetTag: m.assetTag, location: m.location, model: m.model, photoId: m.photoId, kind: 'horizontal_bandsaw', spec: rest as never });
}

/** What the form sends: exactly its values, empty figures as null (the schema then says what is missing). */
export function machineRequest(form: MachineForm): MachineRequestInput {
  return form.getRawValue() as unknown as MachineRequestInput;
}

/** Take away earlier server problems before checking again. */
export function clearServerErrors(control: AbstractControl) {
  if (control instanceof FormGroup || control instanceof FormArray) {
    for (const child of Object.values(control.controls)) clearServerErrors(child as AbstractControl);
  }
  if (control.hasError('server')) {
    const { server: _gone, ...others } = control.errors ?? {};
    control.setErrors(Object.keys(others).length ? others : null);
  }
}
