import { sql, type Kysely } from 'kysely';

// Accounts, sessions, sign-in throttling, first-run set-up and the append-only audit log.
// Frozen once landed: fix forward with a new migration.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('app_user')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('username', 'text', (c) => c.notNull().unique())
    .addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('admin', 'dietitian')`))
    // "scrypt$<N>$<r>$<p>$<salt b64url>$<hash b64url>": the parameters travel with the hash.
    .addColumn('password_hash', 'text', (c) => c.notNull())
    .addColumn('disabled', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addColumn('last_sign_in_at', 'text')
    .execute();

  await db.schema
    .createTable('app_session')
    // SHA-256 of the cookie token: a copy of the database does not hand out live sessions.
    .addColumn('token_hash', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) =>
      c.notNull().references('app_user.id').onDelete('cascade'),
    )
    .addColumn('csrf_token', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('last_seen_at', 'text', (c) => c.notNull())
    .addColumn('idle_expires_at', 'text', (c) => c.notNull())
    .addColumn('absolute_expires_at', 'text', (c) => c.notNull())
    .execute();
  await db.schema.createIndex('app_session_user_idx').on('app_session').column('user_id').execute();

  await db.schema
    .createTable('sign_in_throttle')
    // 'user:<lower-case name>' (known or not, so lock-out does not reveal accounts) or 'ip:<address>'
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('failures', 'integer', (c) => c.notNull())
    .addColumn('window_started_at', 'text', (c) => c.notNull())
    .addColumn('locked_until', 'text')
    .execute();

  await db.schema
    .createTable('setup_token')
    .addColumn('token_hash', 'text', (c) => c.primaryKey())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('audit_event')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('at', 'text', (c) => c.notNull())
    // No foreign keys: the log outlives accounts and patients it mentions.
    .addColumn('user_id', 'integer')
    .addColumn('username', 'text')
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('entity', 'text', (c) => c.notNull())
    .addColumn('entity_id', 'text')
    .addColumn('patient_id', 'text')
    // Set when a patient's record is erased: the same opaque reference on each of their events.
    .addColumn('patient_ref', 'text')
    .addColumn('outcome', 'text', (c) => c.notNull().defaultTo('ok'))
    .addColumn('status_code', 'integer')
    .addColumn('details_json', 'text')
    .execute();
  await db.schema.createIndex('audit_event_at_idx').on('audit_event').column('at').execute();
  await db.schema
    .createIndex('audit_event_patient_idx')
    .on('audit_event')
    .column('patient_id')
    .execute();
  await db.schema.createIndex('audit_event_user_idx').on('audit_event').column('user_id').execute();

  // Append-only: rows can be added, never removed, and changed in one way only: the link to an
  // erased patient is replaced by an opaque reference (patient_id -> NULL, patient_ref set,
  // entity_id cleared where it named the patient), every other column staying as it was.
  await sql`
    CREATE TRIGGER audit_event_no_delete BEFORE DELETE ON audit_event
    BEGIN SELECT RAISE(ABORT, 'audit_event is append-only'); END
  `.execute(db);
  await sql`
    CREATE TRIGGER audit_event_no_update BEFORE UPDATE ON audit_event
    WHEN NOT (
      OLD.patient_id IS NOT NULL AND NEW.patient_id IS NULL
      AND OLD.patient_ref IS NULL AND NEW.patient_ref IS NOT NULL
      AND NEW.id = OLD.id AND NEW.at = OLD.at
      AND NEW.user_id IS OLD.user_id AND NEW.username IS OLD.username
      AND NEW.action = OLD.action AND NEW.entity = OLD.entity
      AND (NEW.entity_id IS OLD.entity_id OR NEW.entity_id IS NULL)
      AND NEW.outcome = OLD.outcome AND NEW.status_code IS OLD.status_code
      AND NEW.details_json IS OLD.details_json
    )
    BEGIN SELECT RAISE(ABORT, 'audit_event is append-only'); END
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TRIGGER IF EXISTS audit_event_no_update`.execute(db);
  await sql`DROP TRIGGER IF EXISTS audit_event_no_delete`.execute(db);
  for (const t of ['audit_event', 'setup_token', 'sign_in_throttle', 'app_session', 'app_user']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
