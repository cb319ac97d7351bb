import type { FastifyInstance } from 'fastify';

/**
 * Takes turns on the event loop: work that waits on `next()` runs one piece per loop turn, in
 * arrival order, with the poll phase (new connections, new requests, health checks) between
 * pieces.
 *
 * Why: libuv accepts at most one new connection per loop turn, and one poll phase runs the
 * handlers of every request that arrived together. Under 200 busy keep-alive connections a turn
 * grew to ~200 ms of handler work, so connections waiting in the kernel's accept queue were let
 * in at ~5 per second and some waited past a client's 10 s timeout, although every request the
 * server saw was answered in < 30 ms. Giving each heavy handler its own turn keeps turns to a
 * few milliseconds, so connections are accepted as fast as they come and answered in order.
 */
export class TurnQueue {
  private readonly waiting: Array<() => void> = [];
  private scheduled = false;

  /** Resolves in a later loop turn of its own, after everything queued before it. */
  next(): Promise<void> {
    return new Promise((resolve) => {
      this.waiting.push(resolve);
      if (!this.scheduled) {
        this.scheduled = true;
        setImmediate(this.release);
      }
    });
  }

  /** How many are waiting for their turn (for health and tests). */
  get length(): number {
    return this.waiting.length;
  }

  // One resolve per immediate: its continuation runs in this callback's microtask drain, and the
  // next immediate, queued from inside the check phase, runs only after the next poll phase.
  private readonly release = () => {
    this.scheduled = false;
    const resolve = this.waiting.shift();
    if (this.waiting.length > 0) {
      this.scheduled = true;
      setImmediate(this.release);
    }
    resolve?.();
  };
}

/**
 * Every route that is not public (the ones that do real work) starts its handler in a turn of
 * its own; public routes (health, sign-in, static assets) answer at once.
 */
export function registerTurns(app: FastifyInstance): TurnQueue {
  const turns = new TurnQueue();
  app.addHook('preHandler', async (request) => {
    if (request.routeOptions.config?.public === true) return;
    await turns.next();
  });
  return turns;
}
