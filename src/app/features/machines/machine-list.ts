import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatCardModule } from '@angular/material/card';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { MachineSummary } from '@setwright/contracts/machines';

const KIND_LABELS: Record<string, string> = { horizontal_bandsaw: 'Horizontal bandsaw' };

/** The machine register: every saw with the figures the procedures and maths read. */
@Component({
  selector: 'sw-machine-list',
  imports: [MatCardModule, MatProgressBarModule],
  templateUrl: './machine-list.html',
  styleUrl: './machine-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachineList {
  private readonly http = inject(HttpClient);
  protected readonly machines = rxResource({ stream: () => this.http.get<MachineSummary[]>('/api/machines') });

  protected kind(m: MachineSummary): string {
    return KIND_LABELS[m.kind] ?? m.kind;
  }

  protected figures(m: MachineSummary): { label: string; value: string }[] {
    const s = m.spec as {
      wheelDiameterMm?: number;
      bladeLengthMm?: number;
      bladeWidthMm?: number;
      bladeThicknessMm?: number;
      tensionRangeKgf?: { min: number; max: number };
      guideClearanceMm?: { min: number; max: number };
      speedSteps?: unknown[];
    };
    const out: { label: string; value: string }[] = [];
    if (s.wheelDiameterMm) out.push({ label: 'Wheel diameter', value: `${s.wheelDiameterMm} mm` });
    if (s.bladeLengthMm) out.push({ label: 'Blade', value: `${s.bladeLengthMm} × ${s.bladeWidthMm} × ${s.bladeThicknessMm} mm` });
    if (s.tensionRangeKgf) out.push({ label: 'Tension range', value: `${s.tensionRangeKgf.min}–${s.tensionRangeKgf.max} kgf` });
    if (s.guideClearanceMm) out.push({ label: 'Guide clearance', value: `${s.guideClearanceMm.min}–${s.guideClearanceMm.max} mm` });
    if (s.speedSteps) out.push({ label: 'Blade speeds', value: `${s.speedSteps.length} steps` });
    return out;
  }
}
