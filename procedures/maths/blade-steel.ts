import { sources, type Source } from './sources';
import type { Quantity } from './units';

export type BladeSteel = 'structural' | 'stainless' | 'carbon-steel' | 'tool-steel';

/** Young's modulus E for the steels a blade (or its backing) may be made of. */
export const steelModulus: Readonly<Record<BladeSteel, { name: string; modulus: Quantity; source: Source }>> = {
  structural: { name: 'structural steel', modulus: { value: 200, unit: 'GPa' }, source: sources.elasticModuli },
  stainless: { name: 'stainless steel', modulus: { value: 200, unit: 'GPa' }, source: sources.elasticModuli },
  'carbon-steel': { name: 'carbon steel, 0.2–0.8 % C', modulus: { value: 207, unit: 'GPa' }, source: sources.elasticModuli },
  'tool-steel': { name: 'tool steel', modulus: { value: 210, unit: 'GPa' }, source: sources.elasticModuli },
};
