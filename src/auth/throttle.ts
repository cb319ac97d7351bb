/** Sign-in failure counting and lock-out: pure, the clock comes in as `now`. */
export interface ThrottleState {
  failures: number;
  windowStartedAt: Date;
  lockedUntil: Date | null;
}

export interface ThrottleRule {
  limit: number;
  windowMs: number;
  lockoutMs: number;
}

/** When the lock ends, or null when not locked at `now`. */
export function lockedUntil(state: ThrottleState | undefined, now: Date): Date | null {
  if (!state?.lockedUntil) return null;
  return state.lockedUntil.getTime() > now.getTime() ? state.lockedUntil : null;
}

/**
 * The state after one more failure: failures older than the window are forgotten; reaching the
 * limit locks for `lockoutMs` and starts counting again afterwards.
 */
export function afterFailure(
  state: ThrottleState | undefined,
  now: Date,
  rule: ThrottleRule,
): ThrottleState {
  const fresh =
    !state ||
    now.getTime() - state.windowStartedAt.getTime() >= rule.windowMs ||
    (state.lockedUntil !== null && state.lockedUntil.getTime() <= now.getTime());
  const failures = fresh ? 1 : state.failures + 1;
  const windowStartedAt = fresh ? now : state.windowStartedAt;
  const locked = failures >= rule.limit ? new Date(now.getTime() + rule.lockoutMs) : null;
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
