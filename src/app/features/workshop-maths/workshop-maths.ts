import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, DOCUMENT, inject, signal, viewChild } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import type { MachineSummary } from '@setwright/contracts/machines';
import type { Quantity, UnitSystem } from '@setwright/maths';
import { BladeLength } from './blade-length/blade-length';
import { BladeTension } from './blade-tension/blade-tension';
import { BreakIn } from './break-in/break-in';
import { Descent } from './descent/descent';
import { DriveBelt } from './drive-belt/drive-belt';
import { FeelerStack } from './feeler-stack/feeler-stack';
import { machineFigures } from './machine-figures';
import { NearestStep } from './nearest-step/nearest-step';
import { PulleySpeed } from './pulley-speed/pulley-speed';
import { RecommendedSpeed } from './recommended-speed/recommended-speed';
import { Squareness } from './squareness/squareness';
import { ToothPitch } from './tooth-pitch/tooth-pitch';
import { UnitChoice } from './unit-choice';

/** The calculators in page order, for the "jump to" list (keys match each card's heading id). */
const CALCULATORS = [
  { key: 'pulley-speed', label: 'Blade speed' },
  { key: 'recommended-speed', label: 'Recommended speed' },
  { key: 'nearest-step', label: 'Nearest step' },
  { key: 'tooth-pitch', label: 'Tooth pitch' },
  { key: 'blade-tension', label: 'Tension' },
  { key: 'blade-length', label: 'Blade length' },
  { key: 'drive-belt', label: 'Drive belt' },
  { key: 'squareness', label: 'Squareness' },
  { key: 'feeler-stack', label: 'Feelers' },
  { key: 'descent', label: 'Descent' },
  { key: 'break-in', label: 'Break-in' },
] as const;

/** Workshop maths: the calculators, in the person's units, optionally filled from a machine in the register. */
@Component({
  selector: 'sw-workshop-maths',
  imports: [
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatIconModule,
    MatSelectModule,
    PulleySpeed,
    RecommendedSpeed,
    NearestStep,
    ToothPitch,
    BladeTension,
    BladeLength,
    DriveBelt,
    Squareness,
    FeelerStack,
    Descent,
    BreakIn,
  ],
  templateUrl: './workshop-maths.html',
  styleUrl: './workshop-maths.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorkshopMaths {
  private readonly http = inject(HttpClient);
  private readonly document = inject(DOCUMENT);
  private readonly unitChoice = inject(UnitChoice);
  private readonly nearestStep = viewChild.required(NearestStep);

  protected readonly calculators = CALCULATORS;
  protected readonly system = this.unitChoice.system;
  protected readonly machines = rxResource({ stream: () => this.http.get<MachineSummary[]>('/api/machines') });
  protected readonly figures = computed(() => (this.machines.hasValue() ? this.machines.value().map(machineFigures) : []));
  protected readonly machineId = signal('');
  protected readonly machine = computed(() => this.figures().find((m) => m.id === this.machineId()) ?? null);

  protected chooseSystem(system: UnitSystem): void {
    this.unitChoice.choose(system);
  }

  protected useSpeed(speed: Quantity): void {
    this.nearestStep().useRecommended(speed);
  }

  /** Brings a calculator into view and puts the focus on its heading. */
  protected jumpTo(key: string): void {
    const heading = this.document.getElementById(`maths-${key}`);
    heading?.scrollIntoView({ behavior: 'smooth', block: 'start' });
    heading?.focus({ preventScroll: true });
  }
}
