import { valueIn, type UnitSystem } from '@setwright/maths';
import type { AreaView } from '@setwright/contracts/blades';

/** An area in m² as the API gives it, in the units the workshop reads (through the maths library's units). */
export function areaFromM2(m2: number): AreaView {
  const q = { value: m2, unit: 'm^2' };
  return { m2, cm2: valueIn(q, 'cm^2'), in2: valueIn(q, 'in^2') };
}

/** An area as the person reads it: cm² (metric) or in² (imperial), whole numbers from 100 up. */
export function areaText(area: AreaView, system: UnitSystem): string {
  const n = system === 'imperial' ? area.in2 : area.cm2;
  const unit = system === 'imperial' ? 'in²' : 'cm²';
  return `${n >= 100 ? Math.round(n).toLocaleString('en-GB') : n.toFixed(1)} ${unit}`;
}
