import type { AuthService } from './auth.service.js';

/**
 * Run after the server listens: while no admin exists, issue a fresh one-time set-up token and
 * print the link (the token is never written anywhere else; its hash is in the database).
 */
export async function announceSetup(
  auth: AuthService,
  baseUrl: string,
  out: NodeJS.WritableStream,
): Promise<string | null> {
  if (!(await auth.setupNeeded())) return null;
  const token = await auth.issueSetupToken();
  const link = `${baseUrl.replace(/\/$/, '')}/setup?token=${token}`;
  out.write(
    [
      '',
      'No admin account yet. Open this one-time link to create it (valid 24 hours, or until the',
      'next start):',
      `  ${link}`,
      'or run: phosledger users add <name> --role admin   (reads the password from stdin)',
      '',
    ].join('\n') + '\n',
  );
  return link;
}
