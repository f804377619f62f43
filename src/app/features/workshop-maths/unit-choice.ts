import { computed, inject, Injectable, linkedSignal } from '@angular/core';
import type { UnitSystem } from '@setwright/maths';
import { Session } from '../../core/session';

/** Where a person's choice is kept on this device. */
export function unitChoiceKey(personId: string): string {
  return `setwright.workshop-maths.units.${personId}`;
}

function remembered(key: string | null): UnitSystem {
  if (key === null) return 'metric';
  try {
    return localStorage.getItem(key) === 'imperial' ? 'imperial' : 'metric';
  } catch {
    return 'metric';
  }
}

/** Metric or imperial for Workshop maths, remembered on this device for each signed-in person. Metric until they choose. */
@Injectable({ providedIn: 'root' })
export class UnitChoice {
  private readonly session = inject(Session);
  private readonly key = computed(() => {
    const id = this.session.user()?.id;
    return id ? unitChoiceKey(id) : null;
  });
  private readonly chosen = linkedSignal<UnitSystem>(() => remembered(this.key()));
  readonly system = this.chosen.asReadonly();

  choose(system: UnitSystem): void {
    this.chosen.set(system);
    const key = this.key();
    if (key === null) return;
    try {
      localStorage.setItem(key, system);
    } catch {
      // Private browsing or a full store: the choice holds for this visit only.
    }
  }
}
