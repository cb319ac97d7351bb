// Sources: none needed (cache behaviour only); keys and values are invented demo data.
import { describe, expect, it } from 'vitest';
import { RenderCache } from '../../src/handouts/render-cache.js';

describe('RenderCache (least recently used, keyed by what the renderer reads)', () => {
  it('gives the same key for equal inputs and a different key when anything differs', () => {
    const vm = { days: [{ label: 'Day 1', phosphorusMg: 812 }], language: 'es' };
    expect(RenderCache.keyOf(vm, 'a4')).toBe(RenderCache.keyOf(structuredClone(vm), 'a4'));
    expect(RenderCache.keyOf(vm, 'a4')).not.toBe(RenderCache.keyOf(vm, 'letter'));
    const changed = { ...vm, days: [{ label: 'Day 1', phosphorusMg: 813 }] };
    expect(RenderCache.keyOf(vm, 'a4')).not.toBe(RenderCache.keyOf(changed, 'a4'));
  });

  it('evicts the least recently used entry beyond its size', () => {
    const c = new RenderCache<string>(2);
    c.set('a', 'A');
    c.set('b', 'B');
    expect(c.get('a')).toBe('A'); // a is now the most recent
    c.set('c', 'C');
    expect(c.get('b')).toBeUndefined();
    expect(c.get('a')).toBe('A');
    expect(c.get('c')).toBe('C');
    expect(c.size).toBe(2);
  });
});
