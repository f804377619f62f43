import { ChangeDetectionStrategy, Component, computed, effect, ElementRef, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormGroup, ReactiveFormsModule, type AbstractControl } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { MACHINE_KIND_LABELS, MACHINE_KINDS, TENSION_READS, TENSION_READS_LABELS } from '@setwright/contracts/machine-spec';
import { machineRequestSchema } from '@setwright/contracts/machines';
import { of } from 'rxjs';
import { applyProblemToForm, controlFor, toProblem, type Problem } from '../../core/problem';
import { PhotoCapture } from '../../shared/ui/photo-capture/photo-capture';
import { MachineApi } from './machine-api';
import { clearServerErrors, fillMachineForm, machineForm, machineRequest, speedStepGroup } from './machine-form';
import { ScheduleForm } from './schedule-form';

/** Register a machine or change one (workshop admins): its details, its figures by group, its photo and its check schedules. */
@Component({
  selector: 'sw-machine-edit',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    RouterLink,
    PhotoCapture,
    ScheduleForm,
  ],
  templateUrl: './machine-edit.html',
  styleUrl: './machine-edit.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachineEdit {
  private readonly api = inject(MachineApi);
  private readonly router = inject(Router);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  /** The machine being changed; absent when registering a new one. */
  readonly id = input<string>();

  protected readonly machine = rxResource({ params: () => this.id(), stream: ({ params }) => (params ? this.api.get(params) : of(null)) });
  protected readonly form = machineForm();
  protected readonly spec = this.form.controls.spec.controls;
  protected readonly steps = this.form.controls.spec.controls.speedSteps;
  protected readonly kinds = MACHINE_KINDS.map((k) => ({ value: k, label: MACHINE_KIND_LABELS[k] }));
  protected readonly reads = TENSION_READS.map((r) => ({ value: r, label: TENSION_READS_LABELS[r] }));
  protected readonly photos = signal<string[]>([]);
  protected readonly saving = signal(false);
  protected readonly formProblems = signal<string[]>([]);
  protected readonly editing = computed(() => !!this.id());

  constructor() {
    effect(() => {
      const m = this.machine.value();
      if (!m) return;
      fillMachineForm(this.form, m);
      this.form.controls.kind.disable();
      this.photos.set(m.photoId ? [m.photoId] : []);
    });
    effect(() => this.form.controls.photoId.setValue(this.photos()[0] ?? null));
  }

  /** The server's (or the shared schema's) word on a field, shown under it. */
  protected problem(control: AbstractControl): string | null {
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected addStep() {
    this.steps.push(speedStepGroup({ label: `${this.steps.length + 1}`, driverMm: null, drivenMm: null }));
  }

  protected removeStep(i: number) {
    this.steps.removeAt(i);
  }

  protected async save() {
    this.formProblems.set([]);
    clearServerErrors(this.form);
    const body = machineRequest(this.form);
    // The same schema the API uses: most mistakes are pointed out before anything is sent.
    const checked = machineRequestSchema.safeParse(body);
    if (!checked.success) {
      this.show({
        type: '/problems/validation',
        title: 'Some fields need correcting',
        status: 400,
        errors: checked.error.issues.map((i) => ({ pointer: '#/' + i.path.map(String).join('/'), detail: i.message })),
      });
      return;
    }
    this.saving.set(true);
    try {
      const saved = await this.api.save(body, this.id());
      await this.router.navigate(['/machines', saved.id]);
    } catch (err) {
      this.show(toProblem(err));
    } finally {
      this.saving.set(false);
    }
  }

  private show(problem: Problem) {
    const left = applyProblemToForm(this.form, problem);
    // A problem with a whole group (an unknown figure in the specification, say) has no field of its own to show under.
    const onGroups = (problem.errors ?? []).filter((e) => controlFor(this.form, e.pointer) instanceof FormGroup);
    const lines = [...left, ...onGroups].map((e) => e.detail);
    if (!problem.errors?.length) lines.push(problem.detail ?? problem.title);
    this.formProblems.set(lines);
    // Take the person to the first field that needs correcting (it may be far up the form).
    setTimeout(() => this.host.nativeElement.querySelector<HTMLElement>('.mat-form-field-invalid input, .mat-form-field-invalid mat-select, .problems')?.focus());
  }
}
