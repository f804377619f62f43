import { HttpErrorResponse, HttpEventType } from '@angular/common/http';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  DestroyRef,
  effect,
  type ElementRef,
  inject,
  input,
  model,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { Subscription } from 'rxjs';
import type { PhotoView } from '@setwright/contracts/photos';
import { Connection } from '../../../core/offline/connection';
import { Outbox } from '../../../core/offline/outbox';
import { toProblem, type Problem } from '../../../core/problem';
import { PhotoApi } from './photo-api';

/** 'on-device': kept on the tablet under a local id, uploaded by the queue when the connection is back. */
type SlotState = 'uploading' | 'done' | 'on-device' | 'offline' | 'failed' | 'refused' | 'removing';

/** One photo in the field, from the moment it is picked. */
interface Slot {
  readonly key: number;
  /** The stored photo's id, once uploaded; or the local id of a photo kept on the tablet. */
  readonly id: string | null;
  /** A retake: the stored photo this one takes the place of once it is uploaded. */
  readonly replaces: string | null;
  /** Kept until the upload succeeds, so Retry can send the same file again. */
  readonly file: File | null;
  /** What is shown: the local picture while uploading, then the thumbnail from the API. */
  readonly preview: string | null;
  readonly state: SlotState;
  readonly progress: number;
  readonly message: string;
}

/** Problems come either straight from HttpClient or already shaped by the app's problem interceptor. */
function asProblem(err: unknown): Problem {
  if (!(err instanceof HttpErrorResponse) && err && typeof err === 'object' && 'title' in err && typeof (err as Problem).status === 'number') {
    return err as Problem;
  }
  return toProblem(err);
}

let nextFieldId = 0;

/**
 * A photo field: take photos with the tablet's rear camera or choose them from the device,
 * see each upload's progress, retry one that lost the connection, retake or remove one.
 * The ids of the uploaded photos are the field's value (`[(photos)]`).
 */
@Component({
  selector: 'sw-photo-capture',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './photo-capture.html',
  styleUrl: './photo-capture.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'sw-photo-capture' },
})
export class PhotoCapture {
  private readonly api = inject(PhotoApi);
  private readonly destroyRef = inject(DestroyRef);
  private readonly outbox = inject(Outbox);
  private readonly connection = inject(Connection);

  /** What the photos are of, e.g. "Tension gauge reading". */
  readonly label = input.required<string>();
  /** How many photos this field takes. */
  readonly max = input(3);
  readonly disabled = input(false);
  /** The ids of the uploaded photos, in order. */
  readonly photos = model<string[]>([]);

  protected readonly slots = signal<readonly Slot[]>([]);
  /** True while any photo is still on its way: a step should not be finished until it is false. */
  readonly busy = computed(() => this.slots().some((s) => s.state === 'uploading' || s.state === 'removing'));
  protected readonly room = computed(() => Math.max(0, this.max() - this.slots().length));
  protected readonly countText = computed(() => {
    const n = this.slots().length;
    const max = this.max();
    if (n === 0) return max === 1 ? 'One photo needed.' : `Up to ${max} photos.`;
    return `${n} of ${max} ${max === 1 ? 'photo' : 'photos'}.`;
  });
  protected readonly fieldId = `sw-photo-capture-${nextFieldId++}`;

  private readonly camera = viewChild.required<ElementRef<HTMLInputElement>>('camera');
  private readonly device = viewChild.required<ElementRef<HTMLInputElement>>('device');
  private retaking: number | null = null;
  private nextKey = 1;
  private readonly uploads = new Map<number, Subscription>();
  private readonly urls = new Set<string>();

  constructor() {
    // Photos set from outside (a step opened again) are shown with their thumbnails.
    effect(() => {
      const ids = this.photos();
      this.outbox.items(); // photos kept on the tablet are shown, and swapped for the server's once uploaded
      untracked(() => {
        this.adopt(ids);
        this.swapUploaded();
      });
    });
    this.destroyRef.onDestroy(() => {
      this.uploads.forEach((s) => s.unsubscribe());
      this.urls.forEach((u) => URL.revokeObjectURL(u));
    });
  }

  protected takePhoto() {
    this.retaking = null;
    this.camera().nativeElement.click();
  }

  protected chooseFromDevice() {
    this.retaking = null;
    this.device().nativeElement.click();
  }

  protected retake(slot: Slot) {
    this.retaking = slot.key;
    this.camera().nativeElement.click();
  }

  protected pickCancelled() {
    this.retaking = null;
  }

  protected picked(event: Event) {
    const input = event.target as HTMLInputElement;
    const files = Array.from(input.files ?? []);
    input.value = ''; // so that picking the same file again still counts
    const retaking = this.retaking;
    this.retaking = null;
    if (files.length === 0 || this.disabled()) return;
    const old = retaking === null ? undefined : this.slot(retaking);
    if (old) {
      this.replace(old, files[0]!);
      return;
    }
    for (const file of files.slice(0, this.room())) this.add(file);
  }

  protected retry(slot: Slot) {
    this.send(slot.key);
  }

  protected remove(slot: Slot) {
    this.uploads.get(slot.key)?.unsubscribe();
    const stored = slot.id ?? slot.replaces;
    if (!stored) {
      this.drop(slot.key);
      return;
    }
    if (this.kept(stored)) {
      // Not on the server (or only there unattached): it leaves the field; a step kept with it keeps it.
      void this.outbox.discardPhoto(stored);
      this.drop(slot.key);
      return;
    }
    this.patch(slot.key, { state: 'removing', message: '' });
    this.api
      .remove(stored)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => this.drop(slot.key),
        error: (err: unknown) => {
          const problem = asProblem(err);
          if (problem.status === 404) {
            this.drop(slot.key);
            return;
          }
          const why = problem.status === 0 ? 'No connection.' : (problem.detail ?? problem.title);
          this.patch(slot.key, { state: slot.id ? 'done' : slot.file ? 'failed' : 'refused', message: `Not removed. ${why}` });
        },
      });
  }

  protected altText(index: number) {
    return `Photo ${index + 1} of ${this.label()}`;
  }

  // ---- uploads ----

  private add(file: File) {
    const slot = this.newSlot({ file, preview: this.urlFor(file) });
    this.slots.update((all) => [...all, slot]);
    this.send(slot.key);
  }

  private replace(old: Slot, file: File) {
    this.uploads.get(old.key)?.unsubscribe();
    const slot = this.newSlot({ file, preview: this.urlFor(file), replaces: old.id ?? old.replaces });
    this.revoke(old.preview);
    this.slots.update((all) => all.map((s) => (s.key === old.key ? slot : s)));
    this.send(slot.key);
  }

  private send(key: number) {
    const slot = this.slot(key);
    if (!slot?.file) return;
    if (!this.connection.online() && this.outbox.canKeep()) {
      void this.keepOnDevice(key);
      return;
    }
    this.uploads.get(key)?.unsubscribe();
    this.patch(key, { state: 'uploading', progress: 0, message: '' });
    const sub = this.api.upload(slot.file, slot.file.name || 'photo').subscribe({
      next: (event) => {
        if (event.type === HttpEventType.UploadProgress) {
          this.patch(key, { progress: event.total ? Math.min(100, Math.round((100 * event.loaded) / event.total)) : 0 });
        } else if (event.type === HttpEventType.Response && event.body) {
          this.uploaded(key, event.body);
        }
      },
      error: (err: unknown) => this.failed(key, err),
    });
    this.uploads.set(key, sub);
  }

  private uploaded(key: number, photo: PhotoView) {
    const slot = this.slot(key);
    if (!slot) return;
    this.uploads.delete(key);
    this.patch(key, { id: photo.id, replaces: null, file: null, state: 'done', progress: 100, message: '' });
    this.publish();
    this.forgetReplaced(slot.replaces);
    this.loadThumbnail(key, photo.id);
  }

  /** The retaken photo is no longer wanted; if it cannot be removed now it stays unattached and unseen. */
  private forgetReplaced(id: string | null) {
    if (!id) return;
    if (this.kept(id)) {
      void this.outbox.discardPhoto(id);
      return;
    }
    this.api.remove(id).pipe(takeUntilDestroyed(this.destroyRef)).subscribe({ error: () => undefined });
  }

  /** No connection: the photo waits on the tablet under a local id, and the queue uploads it before the step that uses it. */
  private async keepOnDevice(key: number) {
    const slot = this.slot(key);
    if (!slot?.file) return;
    this.patch(key, { state: 'uploading', progress: 0, message: '' });
    try {
      const localId = await this.outbox.keepPhoto(slot.file, slot.file.name || 'photo.jpg');
      if (!this.slot(key)) {
        void this.outbox.discardPhoto(localId);
        return;
      }
      this.patch(key, { id: localId, replaces: null, file: null, state: 'on-device', progress: 0, message: '' });
      this.forgetReplaced(slot.replaces);
      this.publish();
    } catch {
      this.patch(key, { state: 'offline', message: '' });
    }
  }

  /** A local id this tablet knows: a photo kept here, waiting or already uploaded by the queue. */
  private kept(id: string): boolean {
    return !!this.outbox.localPhoto(id) || !!this.outbox.serverPhotoId(id);
  }

  /** Photos kept on the tablet that the queue has uploaded take the server's id. */
  private swapUploaded() {
    let changed = false;
    for (const slot of this.slots()) {
      const serverId = slot.state === 'on-device' && slot.id ? this.outbox.serverPhotoId(slot.id) : undefined;
      if (!serverId) continue;
      this.patch(slot.key, { id: serverId, state: 'done' });
      changed = true;
    }
    if (changed) this.publish();
  }

  private failed(key: number, err: unknown) {
    this.uploads.delete(key);
    const problem = asProblem(err);
    this.connection.reachedServer(problem.status !== 0);
    if (problem.status === 0 && this.outbox.canKeep()) {
      void this.keepOnDevice(key);
    } else if (problem.status === 0) {
      this.patch(key, { state: 'offline', message: '' });
    } else if (problem.status >= 500 || problem.status === 408 || problem.status === 429) {
      this.patch(key, { state: 'failed', message: `${problem.title}. ${problem.detail ?? 'Try again.'}` });
    } else {
      this.patch(key, { state: 'refused', file: null, message: problem.detail ?? problem.title });
    }
  }

  private loadThumbnail(key: number, id: string, slotId = id) {
    this.api
      .thumbnail(id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (blob) => {
          const slot = this.slot(key);
          if (!slot || slot.id !== slotId) return;
          this.revoke(slot.preview);
          this.patch(key, { preview: this.urlFor(blob) });
        },
        // Without the thumbnail the local picture (if any) stays; the photo itself is stored.
        error: () => undefined,
      });
  }

  // ---- state ----

  private adopt(ids: readonly string[]) {
    const slots = this.slots();
    const known = new Set(slots.flatMap((s) => [s.id, s.replaces]).filter((x): x is string => !!x));
    const kept = slots.filter((s) => (s.state !== 'done' && s.state !== 'on-device') || (s.id !== null && ids.includes(s.id)));
    const added = ids.filter((id) => !known.has(id)).map((id) => {
      const local = this.outbox.localPhoto(id);
      return local
        ? this.newSlot({ id, state: 'on-device', preview: this.urlFor(local.blob) })
        : this.newSlot({ id, state: 'done', progress: 100 });
    });
    if (kept.length === slots.length && added.length === 0) return;
    slots.filter((s) => !kept.includes(s)).forEach((s) => this.revoke(s.preview));
    this.slots.set([...kept, ...added]);
    // A photo kept here and since uploaded keeps its local id in the field; its thumbnail comes from the server.
    added.filter((s) => s.state === 'done').forEach((s) => this.loadThumbnail(s.key, this.outbox.serverPhotoId(s.id!) ?? s.id!, s.id!));
  }

  /** The field's value: every stored photo, in the order shown (a retake in progress still counts its old photo). */
  private publish() {
    const ids = this.slots().flatMap((s) => (s.id ? [s.id] : s.replaces ? [s.replaces] : []));
    const now = this.photos();
    if (ids.length !== now.length || ids.some((id, i) => id !== now[i])) this.photos.set(ids);
  }

  private drop(key: number) {
    const slot = this.slot(key);
    this.uploads.get(key)?.unsubscribe();
    this.uploads.delete(key);
    this.revoke(slot?.preview ?? null);
    this.slots.update((all) => all.filter((s) => s.key !== key));
    this.publish();
  }

  private newSlot(init: Partial<Slot>): Slot {
    return { key: this.nextKey++, id: null, replaces: null, file: null, preview: null, state: 'uploading', progress: 0, message: '', ...init };
  }

  private slot(key: number): Slot | undefined {
    return this.slots().find((s) => s.key === key);
  }

  private patch(key: number, changes: Partial<Slot>) {
    this.slots.update((all) => all.map((s) => (s.key === key ? { ...s, ...changes } : s)));
  }

  private urlFor(blob: Blob): string {
    const url = URL.createObjectURL(blob);
    this.urls.add(url);
    return url;
  }

  private revoke(url: string | null) {
    if (!url) return;
    URL.revokeObjectURL(url);
    this.urls.delete(url);
  }
}
