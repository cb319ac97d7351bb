import { createHash } from 'node:crypto';
import { LRUCache } from 'lru-cache';

/**
 * A least-recently-used cache of rendered handouts, keyed by a digest of everything the renderer
 * reads (the view-model and the paper size). Rendering is a pure function of those, so a hit can
 * never be stale; plan versions are immutable, so repeated prints of one plan hit.
 */
export class RenderCache<T extends NonNullable<unknown>> {
  private readonly entries: LRUCache<string, T>;

  constructor(maxEntries: number) {
    this.entries = new LRUCache<string, T>({ max: maxEntries });
  }

  static keyOf(...parts: unknown[]): string {
    const h = createHash('sha256');
    for (const p of parts) h.update(JSON.stringify(p) ?? 'undefined').update('\u0000');
    return h.digest('base64url');
  }

  get(key: string): T | undefined {
    return this.entries.get(key);
  }

  set(key: string, value: T): void {
    this.entries.set(key, value);
  }

  get size(): number {
    return this.entries.size;
  }
}
