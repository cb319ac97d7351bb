/** Sign-in failure counting, lock-out and back-off: pure, the clock comes in as `now`. */
export interface ThrottleState {
  failures: number;
  /**
   * When counting started; for a back-off rule, the time of the latest failure (failures are
   * forgotten a whole window after the last one, not the first).
   */
  windowStartedAt: Date;
  lockedUntil: Date | null;
}

export interface ThrottleRule {
  limit: number;
  windowMs: number;
  /** Lock length on reaching the limit; with `maxLockoutMs`, the first lock of a back-off. */
  lockoutMs: number;
  /**
   * Back-off: each failure past the limit doubles the lock, up to this; the count survives the
   * locks and is forgotten after `windowMs` without a failure (or a good sign-in).
   */
  maxLockoutMs?: number;
}

/** When the lock ends, or null when not locked at `now`. */
export function lockedUntil(state: ThrottleState | undefined, now: Date): Date | null {
  if (!state?.lockedUntil) return null;
  return state.lockedUntil.getTime() > now.getTime() ? state.lockedUntil : null;
}

/** Lock length after `failures` failures: fixed, or doubling from the limit up to the cap. */
export function lockoutMsAfter(failures: number, rule: ThrottleRule): number {
  if (rule.maxLockoutMs === undefined) return rule.lockoutMs;
  const doublings = Math.min(Math.max(failures - rule.limit, 0), 30);
  return Math.min(rule.lockoutMs * 2 ** doublings, rule.maxLockoutMs);
}

/**
 * The state after one more failure: failures older than the window are forgotten; reaching the
 * limit locks. A fixed rule starts counting again after the lock; a back-off rule keeps
 * counting, so every further failure locks for longer (up to its cap).
 */
export function afterFailure(
  state: ThrottleState | undefined,
  now: Date,
  rule: ThrottleRule,
): ThrottleState {
  const backoff = rule.maxLockoutMs !== undefined;
  const fresh =
    !state ||
    now.getTime() - state.windowStartedAt.getTime() >= rule.windowMs ||
    (!backoff && state.lockedUntil !== null && state.lockedUntil.getTime() <= now.getTime());
  const failures = fresh ? 1 : state.failures + 1;
  const windowStartedAt = fresh || backoff ? now : state.windowStartedAt;
  const locked =
    failures >= rule.limit ? new Date(now.getTime() + lockoutMsAfter(failures, rule)) : null;
  return { failures, windowStartedAt, lockedUntil: locked };
}

/** Failures still counted at `now` (0 once the window has passed). */
export function activeFailures(
  state: ThrottleState | undefined,
  now: Date,
  rule: ThrottleRule,
): number {
  if (!state) return 0;
  if (now.getTime() - state.windowStartedAt.getTime() >= rule.windowMs) return 0;
  return state.failures;
}

/**
 * Whether one more attempt may be checked now, given `pending` attempts still being checked.
 * Under the limit, attempts in flight count as failures (a burst cannot outrun the counter);
 * past the limit of a back-off rule, one attempt at a time once the lock has passed.
 */
export function mayAttempt(
  state: ThrottleState | undefined,
  now: Date,
  rule: ThrottleRule,
  pending: number,
): { ok: true } | { ok: false; retryAfterMs: number } {
  const until = lockedUntil(state, now);
  if (until) return { ok: false, retryAfterMs: until.getTime() - now.getTime() };
  const failures = activeFailures(state, now, rule);
  const pastLimit = rule.maxLockoutMs !== undefined && failures >= rule.limit;
  if (pastLimit ? pending > 0 : failures + pending >= rule.limit) {
    return { ok: false, retryAfterMs: 1000 };
  }
  return { ok: true };
}
