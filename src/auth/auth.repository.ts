import type Database from 'better-sqlite3';
import type { Kysely, Selectable } from 'kysely';
import type { DB } from '../db/schema.js';
import type { AppSessionTable, AppUserTable, SignInThrottleTable } from './auth.tables.js';
import type { AuthUser, Role } from './auth.js';

export type UserRow = Selectable<AppUserTable>;
export type SessionRow = Selectable<AppSessionTable>;
export type ThrottleRow = Selectable<SignInThrottleTable>;

export function rowToUser(row: Pick<UserRow, 'id' | 'username' | 'role'>): AuthUser {
  return { id: row.id, username: row.username, role: row.role };
}

/** All SQL for accounts, sessions, throttling and set-up tokens. */
export class AuthRepository {
  private readonly sessionLookup: Database.Statement | null;

  /**
   * `sqlite`, when given, serves the per-request session lookup from one prepared statement
   * (Kysely prepares each query anew: about 3x the cost on this path).
   */
  constructor(
    private readonly db: Kysely<DB>,
    sqlite?: Database.Database,
  ) {
    this.sessionLookup =
      sqlite?.prepare(
        `SELECT s.token_hash, s.user_id, s.csrf_token, s.created_at, s.last_seen_at,
           s.idle_expires_at, s.absolute_expires_at, u.username, u.role, u.disabled
         FROM app_session s JOIN app_user u ON u.id = s.user_id WHERE s.token_hash = ?`,
      ) ?? null;
  }

  // users
  findUserByName(username: string): Promise<UserRow | undefined> {
    return this.db
      .selectFrom('app_user')
      .selectAll()
      .where('username', '=', username)
      .executeTakeFirst();
  }

  findUser(id: number): Promise<UserRow | undefined> {
    return this.db.selectFrom('app_user').selectAll().where('id', '=', id).executeTakeFirst();
  }

  listUsers(): Promise<UserRow[]> {
    return this.db.selectFrom('app_user').selectAll().orderBy('username').execute();
  }

  async countAdmins(): Promise<number> {
    const row = await this.db
      .selectFrom('app_user')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('role', '=', 'admin')
      .where('disabled', '=', 0)
      .executeTakeFirstOrThrow();
    return Number(row.n);
  }

  async insertUser(u: {
    username: string;
    role: Role;
    passwordHash: string;
    at: string;
  }): Promise<number> {
    const row = await this.db
      .insertInto('app_user')
      .values({
        username: u.username,
        role: u.role,
        password_hash: u.passwordHash,
        created_at: u.at,
        updated_at: u.at,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    return row.id;
  }

  async updateUser(
    id: number,
    patch: { role?: Role; disabled?: boolean; passwordHash?: string; lastSignInAt?: string },
    at: string,
  ): Promise<void> {
    await this.db
      .updateTable('app_user')
      .set({
        updated_at: at,
        ...(patch.role !== undefined ? { role: patch.role } : {}),
        ...(patch.disabled !== undefined ? { disabled: patch.disabled ? 1 : 0 } : {}),
        ...(patch.passwordHash !== undefined ? { password_hash: patch.passwordHash } : {}),
        ...(patch.lastSignInAt !== undefined ? { last_sign_in_at: patch.lastSignInAt } : {}),
      })
      .where('id', '=', id)
      .execute();
  }

  // sessions
  async insertSession(s: SessionRow): Promise<void> {
    await this.db.insertInto('app_session').values(s).execute();
  }

  findSession(
    tokenHash: string,
  ): Promise<(SessionRow & { username: string; role: Role; disabled: number }) | undefined> {
    if (this.sessionLookup) {
      return Promise.resolve(
        this.sessionLookup.get(tokenHash) as
          (SessionRow & { username: string; role: Role; disabled: number }) | undefined,
      );
    }
    return this.db
      .selectFrom('app_session')
      .innerJoin('app_user', 'app_user.id', 'app_session.user_id')
      .selectAll('app_session')
      .select(['app_user.username', 'app_user.role', 'app_user.disabled'])
      .where('app_session.token_hash', '=', tokenHash)
      .executeTakeFirst();
  }

  async touchSession(tokenHash: string, lastSeenAt: string, idleExpiresAt: string): Promise<void> {
    await this.db
      .updateTable('app_session')
      .set({ last_seen_at: lastSeenAt, idle_expires_at: idleExpiresAt })
      .where('token_hash', '=', tokenHash)
      .execute();
  }

  async deleteSession(tokenHash: string): Promise<void> {
    await this.db.deleteFrom('app_session').where('token_hash', '=', tokenHash).execute();
  }

  async deleteUserSessions(userId: number): Promise<number> {
    const r = await this.db.deleteFrom('app_session').where('user_id', '=', userId).execute();
    return Number(r[0]?.numDeletedRows ?? 0);
  }

  async deleteExpiredSessions(now: string): Promise<void> {
    await this.db
      .deleteFrom('app_session')
      .where((eb) =>
        eb.or([eb('idle_expires_at', '<=', now), eb('absolute_expires_at', '<=', now)]),
      )
      .execute();
  }

  // sign-in throttling
  findThrottle(key: string): Promise<ThrottleRow | undefined> {
    return this.db
      .selectFrom('sign_in_throttle')
      .selectAll()
      .where('key', '=', key)
      .executeTakeFirst();
  }

  async saveThrottle(row: ThrottleRow): Promise<void> {
    await this.db
      .insertInto('sign_in_throttle')
      .values(row)
      .onConflict((oc) =>
        oc.column('key').doUpdateSet({
          failures: row.failures,
          window_started_at: row.window_started_at,
          locked_until: row.locked_until,
        }),
      )
      .execute();
  }

  async clearThrottle(key: string): Promise<void> {
    await this.db.deleteFrom('sign_in_throttle').where('key', '=', key).execute();
  }

  async clearThrottlesLike(pattern: string): Promise<number> {
    const r = await this.db.deleteFrom('sign_in_throttle').where('key', 'like', pattern).execute();
    return Number(r[0]?.numDeletedRows ?? 0);
  }

  // security options kept in the shared `setting` table under keys no settings route serves
  async getOption(key: string): Promise<string | null> {
    const row = await this.db
      .selectFrom('setting')
      .select('value_json')
      .where('key', '=', key)
      .executeTakeFirst();
    return row?.value_json ?? null;
  }

  async setOption(key: string, valueJson: string, at: string): Promise<void> {
    await this.db
      .insertInto('setting')
      .values({ key, value_json: valueJson, updated_at: at })
      .onConflict((oc) => oc.column('key').doUpdateSet({ value_json: valueJson, updated_at: at }))
      .execute();
  }

  // first-run set-up
  async replaceSetupToken(tokenHash: string, at: string, expiresAt: string): Promise<void> {
    await this.db.transaction().execute(async (trx) => {
      await trx.deleteFrom('setup_token').execute();
      await trx
        .insertInto('setup_token')
        .values({ token_hash: tokenHash, created_at: at, expires_at: expiresAt })
        .execute();
    });
  }

  findSetupToken(tokenHash: string) {
    return this.db
      .selectFrom('setup_token')
      .selectAll()
      .where('token_hash', '=', tokenHash)
      .executeTakeFirst();
  }

  async clearSetupTokens(): Promise<void> {
    await this.db.deleteFrom('setup_token').execute();
  }

  /**
   * Consumes a set-up token and creates the first admin in one transaction: the DELETE ...
   * RETURNING succeeds for one caller only, so parallel posts with one token create one admin.
   */
  async consumeSetupTokenForAdmin(
    tokenHash: string,
    now: string,
    admin: { username: string; passwordHash: string },
  ): Promise<{ ok: true; id: number } | { ok: false; reason: 'done' | 'token' | 'taken' }> {
    return this.db
      .transaction()
      .execute(async (trx) => {
        const admins = await trx
          .selectFrom('app_user')
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .where('role', '=', 'admin')
          .where('disabled', '=', 0)
          .executeTakeFirstOrThrow();
        if (Number(admins.n) > 0) return { ok: false, reason: 'done' } as const;
        const consumed = await trx
          .deleteFrom('setup_token')
          .where('token_hash', '=', tokenHash)
          .where('expires_at', '>', now)
          .returning('token_hash')
          .executeTakeFirst();
        if (!consumed) return { ok: false, reason: 'token' } as const;
        const taken = await trx
          .selectFrom('app_user')
          .select('id')
          .where('username', '=', admin.username)
          .executeTakeFirst();
        if (taken) throw new SetupRollback('taken');
        await trx.deleteFrom('setup_token').execute();
        const row = await trx
          .insertInto('app_user')
          .values({
            username: admin.username,
            role: 'admin',
            password_hash: admin.passwordHash,
            created_at: now,
            updated_at: now,
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        return { ok: true, id: row.id } as const;
      })
      .catch((err: unknown) => {
        // A taken username keeps the token: the person may try again with another name.
        if (err instanceof SetupRollback) return { ok: false, reason: err.reason } as const;
        throw err;
      });
  }
}

/** Thrown inside the set-up transaction to roll the token's consumption back. */
class SetupRollback extends Error {
  constructor(readonly reason: 'taken') {
    super(reason);
  }
}
