import { MathsInputError } from './errors';
import { positiveSi, si, type Quantity } from './units';
import { requireObject } from './validate';

/** A round tube, by outside diameter and either inside diameter or wall thickness. */
export interface TubeSection {
  readonly shape: 'tube';
  readonly outside: Quantity;
  readonly inside?: Quantity;
  readonly wall?: Quantity;
}

/** A section being cut, for its cut area. */
export type CutSection =
  | { readonly shape: 'round'; readonly diameter: Quantity }
  | { readonly shape: 'rectangle'; readonly width: Quantity; readonly height: Quantity }
  | TubeSection
  | { readonly shape: 'area'; readonly area: Quantity };

/** Outside and inside diameters of a tube (SI), checked so the bore is smaller than the outside. */
export function tubeDiameters(
  tube: TubeSection,
  path = 'section',
): { outside: number; inside: number } {
  const outside = positiveSi(tube.outside, 'length', `${path}.outside`);
  const refuse = (arg: string, message: string): never => {
    throw new MathsInputError(`${path}.${arg}`, `${path}.${arg} ${message}`, 'out-of-range');
  };
  if (tube.inside !== undefined && tube.wall !== undefined) {
    return refuse('wall', `must not be given together with ${path}.inside`);
  }
  if (tube.wall !== undefined) {
    const wall = positiveSi(tube.wall, 'length', `${path}.wall`);
    if (2 * wall >= outside) return refuse('wall', `must be less than half of ${path}.outside`);
    return { outside, inside: outside - 2 * wall };
  }
  const inside = positiveSi(tube.inside, 'length', `${path}.inside`);
  if (inside >= outside) return refuse('inside', `must be smaller than ${path}.outside`);
  return { outside, inside };
}

/** Cut area: round π·D²/4; rectangle w·h; tube π/4·(D² − d²); or the area given. */
export function sectionArea(section: CutSection, path = 'section'): Quantity {
  const s = requireObject(section, path) as unknown as CutSection;
  switch (s.shape) {
    case 'round': {
      const d = positiveSi(s.diameter, 'length', `${path}.diameter`);
      return si((Math.PI * d * d) / 4, 'area');
    }
    case 'rectangle': {
      const w = positiveSi(s.width, 'length', `${path}.width`);
      return si(w * positiveSi(s.height, 'length', `${path}.height`), 'area');
    }
    case 'tube': {
      const { outside, inside } = tubeDiameters(s, path);
      return si((Math.PI / 4) * (outside * outside - inside * inside), 'area');
    }
    case 'area':
      return si(positiveSi(s.area, 'area', `${path}.area`), 'area');
    default:
      throw new MathsInputError(
        `${path}.shape`,
        `${path}.shape must be one of "round", "rectangle", "tube", "area"`,
        'unknown-name',
      );
  }
}
