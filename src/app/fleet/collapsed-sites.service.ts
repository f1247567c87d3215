import { Injectable, computed, inject, linkedSignal } from '@angular/core';
import { AuthService } from '../core/auth.service';

const KEY_PREFIX = 'jw.fleet.collapsed.';

/** The fleet board's collapsed sites, per signed-in user, kept in this browser. */
@Injectable({ providedIn: 'root' })
export class CollapsedSites {
  private readonly auth = inject(AuthService);
  private readonly userId = computed(() => this.auth.user()?.id ?? null);
  // Another user signing in on this browser gets their own set.
  private readonly state = linkedSignal<number | null, ReadonlySet<number>>({ source: this.userId, computation: (user) => load(user) });

  /** Site ids whose tiles are hidden. */
  readonly ids = this.state.asReadonly();

  has(siteId: number): boolean {
    return this.state().has(siteId);
  }

  toggle(siteId: number): void {
    const next = new Set(this.state());
    if (!next.delete(siteId)) next.add(siteId);
    this.set(next);
  }

  collapseAll(siteIds: readonly number[]): void {
    this.set(new Set([...this.state(), ...siteIds]));
  }

  expandAll(): void {
    this.set(new Set());
  }

  private set(ids: ReadonlySet<number>): void {
    this.state.set(ids);
    save(this.userId(), ids);
  }
}

function load(user: number | null): ReadonlySet<number> {
  if (user === null) return new Set();
  try {
    const raw: unknown = JSON.parse(globalThis.localStorage?.getItem(KEY_PREFIX + user) ?? '[]');
    return new Set(Array.isArray(raw) ? raw.filter((id): id is number => Number.isInteger(id)) : []);
  } catch {
    return new Set();
  }
}

function save(user: number | null, ids: ReadonlySet<number>): void {
  if (user === null) return;
  try {
    globalThis.localStorage?.setItem(KEY_PREFIX + user, JSON.stringify([...ids]));
  } catch {
    /* kept for this visit only */
  }
}
