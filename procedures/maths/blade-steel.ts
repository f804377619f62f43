import { sources, type Source } from './sources';
import type { Quantity } from './units';

export type BladeSteel = 'structural' | 'stainless' | 'carbon-steel' | 'tool-steel';

export interface SteelModulus {
  readonly name: string;
  readonly modulus: Quantity;
  readonly source: Source;
}

const gpa = (name: string, value: number): SteelModulus => ({
  name,
  modulus: { value, unit: 'GPa' },
  source: sources.elasticModuli,
});

/** Young's modulus E for the steels a blade (or its backing) may be made of. */
export const steelModulus: Readonly<Record<BladeSteel, SteelModulus>> = {
  structural: gpa('structural steel', 200),
  stainless: gpa('stainless steel', 200),
  'carbon-steel': gpa('carbon steel, 0.2–0.8 % C', 207),
  'tool-steel': gpa('tool steel', 210),
};
