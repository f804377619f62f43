import { computed, DestroyRef, inject, Injectable, signal } from '@angular/core';

export type ConnectionState = 'online' | 'offline' | 'unreachable';

/**
 * Whether the tablet can reach the server: the browser's own view (no network at all), and what
 * the last request learned (a network that does not get through to the server).
 */
@Injectable({ providedIn: 'root' })
export class Connection {
  private readonly network = signal(typeof navigator === 'undefined' ? true : navigator.onLine);
  private readonly reached = signal(true);
  private readonly listeners = new Set<() => void>();

  /** The browser says there is a network. */
  readonly networkUp = this.network.asReadonly();
  readonly state = computed<ConnectionState>(() => (!this.network() ? 'offline' : this.reached() ? 'online' : 'unreachable'));
  /** Worth trying the server now. */
  readonly online = computed(() => this.state() === 'online');

  constructor() {
    if (typeof window === 'undefined') return;
    const up = () => {
      this.network.set(true);
      this.reached.set(true);
      this.listeners.forEach((l) => l());
    };
    const down = () => this.network.set(false);
    window.addEventListener('online', up);
    window.addEventListener('offline', down);
    inject(DestroyRef).onDestroy(() => {
      window.removeEventListener('online', up);
      window.removeEventListener('offline', down);
    });
  }

  /** Called with each answer the server gave, or each request that did not get through. */
  reachedServer(yes: boolean) {
    this.reached.set(yes);
  }

  /** Run `fn` whenever the browser says the network is back; returns the way to stop. */
  whenBack(fn: () => void): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }
}
