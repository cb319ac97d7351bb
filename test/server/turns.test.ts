import { performance } from 'node:perf_hooks';
import Fastify from 'fastify';
import { describe, expect, it } from 'vitest';
import { registerTurns, TurnQueue } from '../../src/server/turns.js';

// No source needed: these check the order of work on the event loop, with invented requests.
describe('TurnQueue', () => {
  it('lets waiters go in arrival order, one per loop turn', async () => {
    const turns = new TurnQueue();
    const order: string[] = [];
    const runs = ['a', 'b', 'c'].map(async (name) => {
      await turns.next();
      order.push(`${name} starts`);
      await Promise.resolve(); // microtasks of one turn finish before the next turn begins
      order.push(`${name} ends`);
    });
    expect(turns.length).toBe(3);
    await Promise.all(runs);
    expect(order).toEqual(['a starts', 'a ends', 'b starts', 'b ends', 'c starts', 'c ends']);
    expect(turns.length).toBe(0);
  });

  it('does not release anyone within the turn that queued them', async () => {
    const turns = new TurnQueue();
    let released = false;
    void turns.next().then(() => (released = true));
    await Promise.resolve();
    expect(released).toBe(false);
    await new Promise((r) => setImmediate(r));
    await new Promise((r) => setImmediate(r));
    expect(released).toBe(true);
  });
});

describe('registerTurns', () => {
  it('starts each non-public handler in a loop turn of its own; public ones at once', async () => {
    const app = Fastify();
    registerTurns(app);
    // Counts loop turns: one increment per check phase while the test runs.
    let turn = 0;
    let ticking = true;
    const tick = () => {
      turn += 1;
      if (ticking) setImmediate(tick);
    };
    setImmediate(tick);
    const started: number[] = [];
    let healthTurn = -1;
    app.get('/work', async () => {
      started.push(turn);
      const until = performance.now() + 2; // a little synchronous work, as a search does
      while (performance.now() < until);
      return { ok: true };
    });
    app.get('/health', { config: { public: true } }, async () => {
      healthTurn = turn;
      return { ok: true };
    });
    await app.ready();
    const firstTurn = turn;
    const work = Array.from({ length: 8 }, () => app.inject('/work'));
    const health = app.inject('/health');
    await Promise.all([...work, health]);
    ticking = false;
    await app.close();
    expect(new Set(started).size).toBe(8); // eight requests, eight turns
    // Sent last, answered before the queued work was done.
    expect(healthTurn).toBeLessThan(Math.max(...started));
    expect(healthTurn - firstTurn).toBeLessThan(3);
  });
});
