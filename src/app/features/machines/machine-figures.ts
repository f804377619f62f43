import type { MachineSummary } from '@setwright/contracts/machines';

const KIND_LABELS: Record<string, string> = { horizontal_bandsaw: 'Horizontal bandsaw' };

export function kindLabel(kind: string): string {
  return KIND_LABELS[kind] ?? kind;
}

/** The specification figures worth showing on a card, with their units. */
export function machineFigures(m: MachineSummary): { label: string; value: string }[] {
  const s = m.spec as {
    wheelDiameterMm?: number;
    bladeLengthMm?: number;
    bladeWidthMm?: number;
    bladeThicknessMm?: number;
    tensionRangeKgf?: { min: number; max: number };
    tensionReads?: string;
    guideClearanceMm?: { min: number; max: number };
    speedSteps?: unknown[];
  };
  const out: { label: string; value: string }[] = [];
  if (s.wheelDiameterMm) out.push({ label: 'Wheel diameter', value: `${s.wheelDiameterMm} mm` });
  if (s.bladeLengthMm) out.push({ label: 'Blade', value: `${s.bladeLengthMm} × ${s.bladeWidthMm} × ${s.bladeThicknessMm} mm` });
  if (s.tensionRangeKgf) {
    const reads = s.tensionReads === 'wheel-load' ? ' (wheel load)' : s.tensionReads === 'strand' ? ' (per strand)' : '';
    out.push({ label: 'Tension range', value: `${s.tensionRangeKgf.min}–${s.tensionRangeKgf.max} kgf${reads}` });
  }
  if (s.guideClearanceMm) out.push({ label: 'Guide clearance', value: `${s.guideClearanceMm.min}–${s.guideClearanceMm.max} mm` });
  if (s.speedSteps) out.push({ label: 'Blade speeds', value: `${s.speedSteps.length} steps` });
  return out;
}
