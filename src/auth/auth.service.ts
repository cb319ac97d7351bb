import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError } from '../errors.js';
import { AuthRepository, rowToUser, type ThrottleRow } from './auth.repository.js';
import { usernameSchema, type AuthPolicy, type AuthUser, type Role } from './auth.js';
import {
  DEFAULT_SCRYPT_PARAMS,
  hashPassword,
  needsRehash,
  passwordProblem,
  verifyPassword,
  type ScryptParams,
} from './password.js';
import {
  activeFailures,
  afterFailure,
  mayAttempt,
  type ThrottleRule,
  type ThrottleState,
} from './throttle.js';
import { isLoopbackAddress } from './addresses.js';
import { newToken, tokenHash } from './tokens.js';

/** A live session as the auth hook sees it. The token itself is never stored. */
export interface ActiveSession {
  tokenHash: string;
  csrfToken: string;
  createdAt: string;
  idleExpiresAt: string;
  absoluteExpiresAt: string;
}

export interface SignedIn {
  user: AuthUser;
  /** The cookie value; handed to the client once and never stored. */
  token: string;
  session: ActiveSession;
}

export class AuthError extends AppError {}

/** `setting` key (served by no settings route: only the admin route below changes it). */
const DOCS_PUBLIC_KEY = 'security.docs-public';

const invalidCredentials = () =>
  new AuthError('PHL_AUTH_INVALID_CREDENTIALS', 401, 'username or password is wrong');

function toState(row: ThrottleRow | undefined): ThrottleState | undefined {
  if (!row) return undefined;
  return {
    failures: row.failures,
    windowStartedAt: new Date(row.window_started_at),
    lockedUntil: row.locked_until ? new Date(row.locked_until) : null,
  };
}

/** Accounts, sign-in with lock-out, sessions and the first-run set-up token. */
export class AuthService {
  private readonly repo: AuthRepository;
  /** Attempts whose password check is still running, per throttle key. */
  private readonly inFlight = new Map<string, number>();
  private dummyHash: Promise<string> | undefined;

  constructor(
    db: Db,
    private readonly clock: Clock,
    readonly policy: AuthPolicy,
    private readonly scryptParams: ScryptParams = DEFAULT_SCRYPT_PARAMS,
  ) {
    this.repo = new AuthRepository(db.kysely, db.sqlite);
  }

  private now(): Date {
    return this.clock.now();
  }

  /** Validates and normalises a username, or throws 400. */
  static normaliseUsername(username: string): string {
    const parsed = usernameSchema.safeParse(username);
    if (!parsed.success) {
      throw new AppError(
        'PHL_AUTH_USERNAME_INVALID',
        400,
        `username: ${parsed.error.issues[0]?.message ?? 'invalid'}`,
      );
    }
    return parsed.data;
  }

  async createUser(username: string, role: Role, password: string): Promise<AuthUser> {
    const name = AuthService.normaliseUsername(username);
    const problem = passwordProblem(password, name);
    if (problem) throw new AppError('PHL_AUTH_PASSWORD_WEAK', 400, problem);
    if (await this.repo.findUserByName(name)) {
      throw new AppError('PHL_AUTH_USERNAME_TAKEN', 409, `username ${name} is already taken`);
    }
    const passwordHash = await hashPassword(password, this.scryptParams);
    const id = await this.repo.insertUser({
      username: name,
      role,
      passwordHash,
      at: this.now().toISOString(),
    });
    return { id, username: name, role };
  }

  async listUsers() {
    return (await this.repo.listUsers()).map((u) => ({
      ...rowToUser(u),
      disabled: u.disabled === 1,
      createdAt: u.created_at,
      lastSignInAt: u.last_sign_in_at,
    }));
  }

  async getUser(id: number): Promise<AuthUser | null> {
    const row = await this.repo.findUser(id);
    return row ? rowToUser(row) : null;
  }

  async countAdmins(): Promise<number> {
    return this.repo.countAdmins();
  }

  /** Changes role or disabled state; disabling signs the user out everywhere. */
  async updateUser(id: number, patch: { role?: Role; disabled?: boolean }): Promise<void> {
    const row = await this.repo.findUser(id);
    if (!row) throw new AppError('PHL_AUTH_USER_NOT_FOUND', 404, `user ${id} not found`);
    const losesAdmin =
      row.role === 'admin' &&
      row.disabled === 0 &&
      ((patch.role !== undefined && patch.role !== 'admin') || patch.disabled === true);
    if (losesAdmin && (await this.repo.countAdmins()) <= 1) {
      throw new AppError('PHL_AUTH_LAST_ADMIN', 409, 'the last active admin cannot be removed');
    }
    await this.repo.updateUser(id, patch, this.now().toISOString());
    if (patch.disabled) await this.repo.deleteUserSessions(id);
  }

  async setPassword(id: number, password: string): Promise<void> {
    const row = await this.repo.findUser(id);
    if (!row) throw new AppError('PHL_AUTH_USER_NOT_FOUND', 404, `user ${id} not found`);
    const problem = passwordProblem(password, row.username);
    if (problem) throw new AppError('PHL_AUTH_PASSWORD_WEAK', 400, problem);
    const passwordHash = await hashPassword(password, this.scryptParams);
    await this.repo.updateUser(id, { passwordHash }, this.now().toISOString());
  }

  /**
   * Checks the current password on password change. Wrong answers count as sign-in failures of
   * the account (so guessing here is throttled like signing in), a locked account is refused,
   * and after `passwordChangeFailureLimit` failures the session that guessed is ended.
   */
  async checkCurrentPassword(user: AuthUser, password: string, session: ActiveSession) {
    const key = `user:${user.username}`;
    const rule = this.rules().user;
    const now = this.now();
    this.refuseIfLocked(key, toState(await this.repo.findThrottle(key)), now, rule);
    const ok = await this.whileChecking([key], async () => {
      const row = await this.repo.findUser(user.id);
      return !!row && (await verifyPassword(password, row.password_hash));
    });
    if (ok) return;
    const after = await this.recordFailure(key, rule);
    if (activeFailures(after, this.now(), rule) >= this.policy.passwordChangeFailureLimit) {
      await this.signOut(session);
      throw new AuthError(
        'PHL_AUTH_SESSION_ENDED',
        401,
        'current password wrong too many times: you have been signed out',
      );
    }
    throw new AuthError('PHL_AUTH_INVALID_CREDENTIALS', 401, 'current password is wrong');
  }

  private rules() {
    const p = this.policy;
    return {
      user: {
        limit: p.userFailureLimit,
        windowMs: p.userFailureWindowMs,
        lockoutMs: p.userLockoutMs,
        maxLockoutMs: p.userLockoutMaxMs,
      },
      address: {
        limit: p.addressFailureLimit,
        windowMs: p.failureWindowMs,
        lockoutMs: p.lockoutMs,
      },
    };
  }

  private async recordFailure(key: string, rule: ThrottleRule): Promise<ThrottleState> {
    const now = this.now();
    const next = afterFailure(toState(await this.repo.findThrottle(key)), now, rule);
    await this.repo.saveThrottle({
      key,
      failures: next.failures,
      window_started_at: next.windowStartedAt.toISOString(),
      locked_until: next.lockedUntil?.toISOString() ?? null,
    });
    return next;
  }

  /**
   * Runs a password check counted as in flight for the keys: attempts still being checked count
   * as failures, so a burst of parallel guesses cannot outrun the counter.
   */
  private async whileChecking<T>(keys: string[], check: () => Promise<T>): Promise<T> {
    const bump = (d: number) => {
      for (const key of keys) {
        const n = (this.inFlight.get(key) ?? 0) + d;
        if (n > 0) this.inFlight.set(key, n);
        else this.inFlight.delete(key);
      }
    };
    bump(1);
    try {
      return await check();
    } finally {
      bump(-1);
    }
  }

  private refuseIfLocked(
    key: string,
    state: ThrottleState | undefined,
    now: Date,
    rule: ThrottleRule,
  ): void {
    const verdict = mayAttempt(state, now, rule, this.inFlight.get(key) ?? 0);
    if (verdict.ok) return;
    throw new AuthError(
      'PHL_AUTH_LOCKED',
      429,
      'too many failed sign-ins: try again later or ask the clinic admin',
      { retryAfterS: Math.max(1, Math.ceil(verdict.retryAfterMs / 1000)) },
    );
  }

  /** Clears a username's failures and lock (`phosledger users unlock`). True if it had any. */
  async unlockUser(username: string): Promise<boolean> {
    const key = `user:${username.trim().toLowerCase()}`;
    const had = (await this.repo.findThrottle(key)) !== undefined;
    await this.repo.clearThrottle(key);
    return had;
  }

  /** Clears every address lock (`phosledger users unlock --addresses`). Returns how many. */
  async unlockAddresses(): Promise<number> {
    return this.repo.clearThrottlesLike('ip:%');
  }

  /**
   * Signs in. Unknown usernames cost the same scrypt work as known ones and count towards
   * lock-out the same way, so neither timing nor lock-out tells which accounts exist. Loopback
   * addresses are not throttled as addresses (behind a proxy every client shares one).
   */
  async signIn(username: string, password: string, address: string): Promise<SignedIn> {
    const name = username.trim().toLowerCase();
    const rules = this.rules();
    const now = this.now();
    const checks: Array<{ key: string; rule: ThrottleRule }> = [
      { key: `user:${name}`, rule: rules.user },
    ];
    if (!isLoopbackAddress(address)) checks.push({ key: `ip:${address}`, rule: rules.address });
    for (const { key, rule } of checks) {
      this.refuseIfLocked(key, toState(await this.repo.findThrottle(key)), now, rule);
    }
    const keys = checks.map((c) => c.key);
    const { row, ok } = await this.whileChecking(keys, async () => {
      const found = await this.repo.findUserByName(name);
      this.dummyHash ??= hashPassword('not a real password', this.scryptParams);
      const matches = await verifyPassword(
        password,
        found?.password_hash ?? (await this.dummyHash),
      );
      return { row: found, ok: matches };
    });
    if (!row || !ok || row.disabled === 1) {
      for (const { key, rule } of checks) await this.recordFailure(key, rule);
      throw invalidCredentials();
    }
    await this.repo.clearThrottle(`user:${name}`);
    const at = this.now().toISOString();
    const rehash = needsRehash(row.password_hash, this.scryptParams)
      ? await hashPassword(password, this.scryptParams)
      : undefined;
    await this.repo.updateUser(
      row.id,
      { lastSignInAt: at, ...(rehash ? { passwordHash: rehash } : {}) },
      at,
    );
    return this.openSession(rowToUser(row));
  }

  /** Starts a session for a user whose identity is already established. */
  async openSession(user: AuthUser): Promise<SignedIn> {
    const now = this.now();
    const token = newToken();
    const absolute = new Date(now.getTime() + this.policy.absoluteTimeoutMs);
    const idle = new Date(Math.min(now.getTime() + this.policy.idleTimeoutMs, absolute.getTime()));
    const session: ActiveSession = {
      tokenHash: tokenHash(token),
      csrfToken: newToken(),
      createdAt: now.toISOString(),
      idleExpiresAt: idle.toISOString(),
      absoluteExpiresAt: absolute.toISOString(),
    };
    await this.repo.insertSession({
      token_hash: session.tokenHash,
      user_id: user.id,
      csrf_token: session.csrfToken,
      created_at: session.createdAt,
      last_seen_at: session.createdAt,
      idle_expires_at: session.idleExpiresAt,
      absolute_expires_at: session.absoluteExpiresAt,
    });
    return { user, token, session };
  }

  /** The user and session behind a cookie token, or null; extends the idle deadline. */
  async authenticate(token: string): Promise<{ user: AuthUser; session: ActiveSession } | null> {
    if (token.length < 20 || token.length > 100) return null;
    const hash = tokenHash(token);
    const row = await this.repo.findSession(hash);
    if (!row) return null;
    const now = this.now();
    const nowMs = now.getTime();
    if (
      nowMs >= Date.parse(row.idle_expires_at) ||
      nowMs >= Date.parse(row.absolute_expires_at) ||
      row.disabled === 1
    ) {
      await this.repo.deleteSession(hash);
      return null;
    }
    let idleExpiresAt = row.idle_expires_at;
    if (nowMs - Date.parse(row.last_seen_at) >= this.policy.touchIntervalMs) {
      idleExpiresAt = new Date(
        Math.min(nowMs + this.policy.idleTimeoutMs, Date.parse(row.absolute_expires_at)),
      ).toISOString();
      await this.repo.touchSession(hash, now.toISOString(), idleExpiresAt);
    }
    return {
      user: { id: row.user_id, username: row.username, role: row.role },
      session: {
        tokenHash: hash,
        csrfToken: row.csrf_token,
        createdAt: row.created_at,
        idleExpiresAt,
        absoluteExpiresAt: row.absolute_expires_at,
      },
    };
  }

  async signOut(session: ActiveSession): Promise<void> {
    await this.repo.deleteSession(session.tokenHash);
  }

  /** Ends every session of a user, on every device. Returns how many ended. */
  async signOutEverywhere(userId: number): Promise<number> {
    return this.repo.deleteUserSessions(userId);
  }

  async purgeExpiredSessions(): Promise<void> {
    await this.repo.deleteExpiredSessions(this.now().toISOString());
  }

  /** Whether the admin lets the API docs (/api/docs) answer without sign-in (default: no). */
  async docsPublic(): Promise<boolean> {
    return (await this.repo.getOption(DOCS_PUBLIC_KEY)) === 'true';
  }

  async setDocsPublic(value: boolean): Promise<void> {
    await this.repo.setOption(DOCS_PUBLIC_KEY, value ? 'true' : 'false', this.now().toISOString());
  }

  // first-run set-up

  /** True while no active admin exists: the product cannot be administered yet. */
  async setupNeeded(): Promise<boolean> {
    return (await this.repo.countAdmins()) === 0;
  }

  /** Issues a new one-time set-up token (replacing any earlier one) and returns it. */
  async issueSetupToken(): Promise<string> {
    const token = newToken();
    const now = this.now();
    const expires = new Date(now.getTime() + this.policy.setupTokenTtlMs);
    await this.repo.replaceSetupToken(tokenHash(token), now.toISOString(), expires.toISOString());
    return token;
  }

  async setupTokenValid(token: string): Promise<boolean> {
    if (token.length < 20 || token.length > 100) return false;
    const row = await this.repo.findSetupToken(tokenHash(token));
    return !!row && Date.parse(row.expires_at) > this.now().getTime();
  }

  /**
   * Creates the first admin with a valid set-up token. The token is consumed in the same
   * transaction that creates the account, so one token makes one admin however many posts race.
   * A refusal (set-up done, link spent or expired, weak password, name taken) is a value.
   */
  async trySetup(
    token: string,
    username: string,
    password: string,
  ): Promise<{ ok: true; signedIn: SignedIn } | { ok: false; error: AppError }> {
    const refuse = (code: string, status: number, message: string) => ({
      ok: false as const,
      error: new AppError(code, status, message),
    });
    const setupDone = () =>
      refuse('PHL_AUTH_SETUP_DONE', 409, 'set-up is already done: sign in instead');
    const badToken = () =>
      refuse(
        'PHL_AUTH_SETUP_TOKEN_INVALID',
        403,
        'the set-up link is invalid or has expired: restart the server for a new one',
      );
    if (!(await this.setupNeeded())) return setupDone();
    if (!(await this.setupTokenValid(token))) return badToken();
    const name = AuthService.normaliseUsername(username);
    const problem = passwordProblem(password, name);
    if (problem) return refuse('PHL_AUTH_PASSWORD_WEAK', 400, problem);
    const passwordHash = await hashPassword(password, this.scryptParams);
    const created = await this.repo.consumeSetupTokenForAdmin(
      tokenHash(token),
      this.now().toISOString(),
      { username: name, passwordHash },
    );
    if (!created.ok) {
      if (created.reason === 'done') return setupDone();
      if (created.reason === 'taken') {
        return refuse('PHL_AUTH_USERNAME_TAKEN', 409, `username ${name} is already taken`);
      }
      return badToken();
    }
    const signedIn = await this.openSession({ id: created.id, username: name, role: 'admin' });
    return { ok: true, signedIn };
  }

  /** `trySetup` for callers that answer a refusal with the error handler. */
  async completeSetup(token: string, username: string, password: string): Promise<SignedIn> {
    const result = await this.trySetup(token, username, password);
    if (!result.ok) throw result.error;
    return result.signedIn;
  }
}
