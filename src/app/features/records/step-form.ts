import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatRadioModule } from '@angular/material/radio';
import { firstValueFrom, map, startWith, switchMap } from 'rxjs';
import type { StepEntryView } from '@setwright/contracts/records';
import { evaluateStep, type ComputedResult, type EntryValue, type EntryValues, type MachineSpec } from '@setwright/procedures/engine';
import type { Step, StepInput } from '@setwright/procedures/schema';
import { Connection } from '../../core/offline/connection';
import { Outbox } from '../../core/offline/outbox';
import type { EntryItem } from '../../core/offline/outbox-items';
import { applyProblemToForm, toProblem, type Problem } from '../../core/problem';
import { CautionList } from '../../shared/ui/caution/caution-list';
import { PhotoCapture } from '../../shared/ui/photo-capture/photo-capture';
import { ReadingField } from '../../shared/ui/reading-field/reading-field';
import { RecordApi } from './record-api';
import { WitnessDialog, type WitnessCredentials, type WitnessDialogData } from './witness-dialog';

type Values = Record<string, EntryValue>;

const OFFLINE_POWERED =
  'This step runs with power on: the witness signs in on the server, so it needs the connection. Carry on with the other steps, and come back to this one when the Wi-Fi is back.';

function controlFor(input: StepInput, value: unknown): FormControl {
  switch (input.type) {
    case 'number':
      return new FormControl<number | null>(typeof value === 'number' ? value : null);
    case 'yesno':
      return new FormControl<boolean | null>(typeof value === 'boolean' ? value : null);
    case 'photo':
      return new FormControl<string[]>(Array.isArray(value) ? (value as string[]) : [], { nonNullable: true });
    default:
      return new FormControl<string>(typeof value === 'string' ? value : '', { nonNullable: true });
  }
}

/** One step of a procedure at the saw: cautions first, the instruction, the inputs with live limits and maths, then save. */
@Component({
  selector: 'sw-step-form',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatInputModule,
    MatRadioModule,
    MatIconModule,
    MatProgressBarModule,
    CautionList,
    ReadingField,
    PhotoCapture,
  ],
  templateUrl: './step-form.html',
  styleUrl: './step-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StepForm {
  private readonly api = inject(RecordApi);
  private readonly dialog = inject(MatDialog);
  private readonly outbox = inject(Outbox);
  private readonly connection = inject(Connection);

  readonly recordId = input.required<string>();
  readonly step = input.required<Step>();
  readonly spec = input.required<MachineSpec>();
  /** The latest saved attempt of this step, if any. */
  readonly entry = input<StepEntryView>();
  /** The person may complete a powered step without a separate witness (a competent person running it). */
  readonly selfWitness = input(false);
  readonly readOnly = input(false);
  /** The entry shown waits on this device (not yet on the server). */
  readonly onDevice = input(false);
  /** Saved on the server. */
  readonly saved = output<StepEntryView>();
  /** Kept on this device, to go to the server when the connection is back. */
  readonly kept = output<EntryItem>();

  protected readonly busy = signal(false);
  protected readonly message = signal<string | null>(null);
  /** Kept across a lost connection, so the retry is recognised by the server as the same entry. */
  private pendingKey: string | null = null;
  private witnessEmail = '';

  protected readonly form = computed(() => {
    const saved = this.entry()?.values ?? {};
    const controls: Record<string, FormControl> = {};
    for (const input of this.step().inputs) controls[input.id] = controlFor(input, saved[input.id]);
    controls['correctiveNote'] = new FormControl<string>(this.entry()?.correctiveNote ?? '', { nonNullable: true });
    const group = new FormGroup(controls);
    if (this.readOnly()) group.disable();
    return group;
  });

  private readonly values = toSignal(
    toObservable(this.form).pipe(switchMap((f) => f.valueChanges.pipe(startWith(f.getRawValue()), map(() => f.getRawValue() as Values)))),
    { initialValue: {} as Values },
  );

  /** The same evaluation the server will make, live as the trainee types. */
  protected readonly evaluation = computed(() => {
    const values: EntryValues = { ...this.values() };
    delete values['correctiveNote'];
    try {
      return evaluateStep(this.step(), values, this.spec());
    } catch {
      return null;
    }
  });

  protected readonly inputResult = (id: string) => this.evaluation()?.inputs.find((i) => i.id === id);
  protected readonly needsWitness = computed(() => this.step().powered && !this.selfWitness());
  /** A step run with power on is witnessed there and then, so it needs the server. */
  protected readonly waitsForConnection = computed(() => !!this.step().powered && !this.connection.online());

  /** A result's own explanation (a verdict's message), when the maths gives one. */
  protected note(c: ComputedResult): string | null {
    const message = (c.detail as { message?: unknown } | undefined)?.message;
    return typeof message === 'string' && c.outcome !== 'pass' ? message : null;
  }

  protected control(id: string): FormControl {
    return this.form().controls[id] as FormControl;
  }

  protected async save() {
    this.message.set(null);
    const evaluation = this.evaluation();
    const form = this.form();
    const refused = this.step().inputs.some((i) => i.type === 'number' && form.controls[i.id]!.hasError('figure'));
    if (refused) {
      form.markAllAsTouched();
      this.message.set('Put right the readings marked in red first: each says what it cannot read.');
      return;
    }
    if (!evaluation || !evaluation.complete) {
      form.markAllAsTouched();
      this.message.set('Fill in every reading and answer first.');
      return;
    }
    const note = (form.controls['correctiveNote']!.value as string).trim();
    if (evaluation.outOfLimits && !note) {
      form.controls['correctiveNote']!.setErrors({ required: true });
      form.controls['correctiveNote']!.markAsTouched();
      this.message.set('Something is out of limits: say what you found and what you did, then save. Or fix it and re-measure.');
      return;
    }
    if (this.waitsForConnection()) {
      this.message.set(OFFLINE_POWERED);
      return;
    }
    let witness: WitnessCredentials | undefined;
    if (this.needsWitness()) {
      witness = await this.askWitness();
      if (!witness) return;
    }
    await this.send(note, witness);
  }

  private askWitness(problem?: string): Promise<WitnessCredentials | undefined> {
    const data: WitnessDialogData = { stepTitle: this.step().title, problem, email: this.witnessEmail };
    return firstValueFrom(this.dialog.open(WitnessDialog, { data, width: '520px', maxWidth: '95vw' }).afterClosed());
  }

  private async send(note: string, witness?: WitnessCredentials) {
    const form = this.form();
    const values: Values = {};
    for (const input of this.step().inputs) {
      const v = form.controls[input.id]!.value as EntryValue;
      values[input.id] = v === '' ? null : v;
    }
    this.pendingKey ??= crypto.randomUUID();
    const request = { idempotencyKey: this.pendingKey, stepId: this.step().id, values, correctiveNote: note || undefined };
    // Steps with power on go straight to the server (a witness signs there and then); others keep
    // their place in the queue behind anything of this record still waiting on the device.
    const queueable = !this.step().powered && this.outbox.canKeep();
    this.busy.set(true);
    try {
      if (queueable && this.outbox.mustQueue(this.recordId(), values)) {
        await this.keep(request);
        return;
      }
      const entry = await this.api.saveStep(this.recordId(), { ...request, values: this.outbox.withServerPhotoIds(values), witness });
      this.pendingKey = null;
      this.saved.emit(entry);
    } catch (err) {
      const problem: Problem = toProblem(err);
      this.connection.reachedServer(problem.status !== 0);
      if (problem.status === 0 && queueable) {
        await this.keep(request);
        return;
      }
      if (problem.status !== 0) this.pendingKey = null;
      if (witness) this.witnessEmail = witness.email;
      this.showProblem(problem, !!witness);
    } finally {
      this.busy.set(false);
    }
  }

  /** Keep the step on this device with its idempotency key; it goes to the server in its turn. */
  private async keep(request: EntryItem['request']) {
    const evaluation = this.evaluation()!;
    try {
      const item = await this.outbox.keepEntry(this.recordId(), request, { evaluation, outcome: evaluation.outOfLimits ? 'out_of_limits' : 'done' });
      this.pendingKey = null;
      this.message.set(null);
      this.kept.emit(item);
    } catch {
      this.message.set('No connection, and this tablet could not keep the step. Your entries are still here: save again when the connection is back.');
    }
  }

  private showProblem(problem: Problem, witnessed: boolean) {
    const form = this.form();
    const witnessProblem = problem.errors?.some((e) => e.pointer.startsWith('#/witness'));
    if (witnessed && witnessProblem) {
      this.message.set(`Witness not accepted: ${problem.detail ?? problem.title}`);
      return;
    }
    const mapped = { ...problem, errors: problem.errors?.map((e) => ({ ...e, pointer: e.pointer.replace(/^#\/values\//, '#/') })) };
    applyProblemToForm(form, mapped);
    this.message.set(problem.status === 0 ? `${problem.detail} Your entries are still here: save again when the connection is back.` : (problem.detail ?? problem.title));
  }
}
