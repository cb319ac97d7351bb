import { createHash } from 'node:crypto';

/**
 * A small least-recently-used cache of rendered handouts, keyed by a digest of everything the
 * renderer reads (the view-model and the paper size). Rendering is a pure function of those, so
 * a hit can never be stale; plan versions are immutable, so repeated prints of one plan hit.
 */
export class RenderCache<T> {
  private readonly entries = new Map<string, T>();

  constructor(private readonly maxEntries: number) {}

  static keyOf(...parts: unknown[]): string {
    const h = createHash('sha256');
    for (const p of parts) h.update(JSON.stringify(p) ?? 'undefined').update('\u0000');
    return h.digest('base64url');
  }

  get(key: string): T | undefined {
    const v = this.entries.get(key);
    if (v !== undefined) {
      this.entries.delete(key);
      this.entries.set(key, v); // most recently used last
    }
    return v;
  }

  set(key: string, value: T): void {
    this.entries.delete(key);
    this.entries.set(key, value);
    while (this.entries.size > this.maxEntries) {
      const oldest = this.entries.keys().next().value as string;
      this.entries.delete(oldest);
    }
  }

  get size(): number {
    return this.entries.size;
  }
}
