import { api, ApiError, resetSession } from '../api.js';
import { byId, say } from '../dom.js';

/** Only same-site paths are followed after sign-in (no open redirect). */
function safeNext(): string {
  const next = new URLSearchParams(location.search).get('next') ?? '';
  return next.startsWith('/') && !next.startsWith('//') && !next.startsWith('/\\')
    ? next
    : '/patients';
}

const form = byId<HTMLFormElement>('signin-form');
form.addEventListener('submit', (e) => {
  e.preventDefault();
  const username = byId<HTMLInputElement>('signin-username').value.trim();
  const password = byId<HTMLInputElement>('signin-password').value;
  if (!username || !password) {
    say('signin-status', 'Enter your username and password.', 'error');
    return;
  }
  say('signin-status', 'Signing in…');
  api('POST', '/api/session', { username, password }, { noRedirect: true })
    .then(() => {
      resetSession();
      location.assign(safeNext());
    })
    .catch((err: unknown) => {
      const msg =
        err instanceof ApiError && err.code === 'PHL_AUTH_LOCKED'
          ? 'Too many failed attempts: this account is locked for a while. Ask your administrator if it persists.'
          : err instanceof ApiError && err.status === 401
            ? 'Username or password is wrong.'
            : `Sign-in failed: ${(err as Error).message}`;
      say('signin-status', msg, 'error');
      byId<HTMLInputElement>('signin-password').select();
    });
});
