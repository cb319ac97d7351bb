import { api, currentSession, resetSession } from './api.js';

/** The top bar: who is signed in, and sign-out. Every protected page calls this first. */
export function initChrome(): void {
  const name = document.getElementById('whoami-name');
  void currentSession().then((s) => {
    if (name && s.user) name.textContent = `${s.user.username} (${s.user.role})`;
  });
  document.getElementById('signout')?.addEventListener('click', () => {
    void api('DELETE', '/api/session', undefined, { noRedirect: true })
      .catch(() => undefined)
      .then(() => {
        resetSession();
        location.assign('/signin');
      });
  });
}
