import type { Generated } from 'kysely';

export interface AppUserTable {
  id: Generated<number>;
  username: string;
  role: 'admin' | 'dietitian';
  password_hash: string;
  disabled: Generated<number>;
  created_at: string;
  updated_at: string;
  last_sign_in_at: string | null;
}

export interface AppSessionTable {
  token_hash: string;
  user_id: number;
  csrf_token: string;
  created_at: string;
  last_seen_at: string;
  idle_expires_at: string;
  absolute_expires_at: string;
}

export interface SignInThrottleTable {
  key: string;
  failures: number;
  window_started_at: string;
  locked_until: string | null;
}

export interface SetupTokenTable {
  token_hash: string;
  created_at: string;
  expires_at: string;
}

export interface AuthTables {
  app_user: AppUserTable;
  app_session: AppSessionTable;
  sign_in_throttle: SignInThrottleTable;
  setup_token: SetupTokenTable;
}
