import { Injectable } from '@angular/core';

/**
 * Which fleet tiles are on screen (or near it), through one IntersectionObserver for all of them. A board of
 * 2,000 engines redraws only the tiles someone can see; the others catch up when they scroll into view.
 */
@Injectable({ providedIn: 'root' })
export class OnScreen {
  private readonly listeners = new Map<Element, (visible: boolean) => void>();
  private observer: IntersectionObserver | null = null;

  /** Calls `changed` whenever `el` comes on or goes off screen; returns the way to stop. */
  watch(el: Element, changed: (visible: boolean) => void): () => void {
    if (typeof IntersectionObserver === 'undefined') return () => undefined; // stays "on screen"
    this.observer ??= new IntersectionObserver(
      (entries) => {
        for (const entry of entries) this.listeners.get(entry.target)?.(entry.isIntersecting);
      },
      { rootMargin: '50% 0px' }, // half a screen above and below: a tile is current before it is scrolled to
    );
    this.listeners.set(el, changed);
    this.observer.observe(el);
    return () => {
      this.listeners.delete(el);
      this.observer?.unobserve(el);
    };
  }
}
