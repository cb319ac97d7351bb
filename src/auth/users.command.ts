import { cliActor } from '../audit/actors.js';
import { recordAudit } from '../audit/audit.service.js';
import { systemClock } from '../clock.js';
import type { Command, CommandContext } from '../cli/command.js';
import { UsageError } from '../cli/command.js';
import { AppError } from '../errors.js';
import { DEFAULT_AUTH_POLICY, roleSchema } from './auth.js';
import { AuthService } from './auth.service.js';
import { MAX_PASSWORD_LENGTH } from './password.js';

/**
 * Reads a password from standard input: the first line of piped input, or a line typed on a
 * terminal without echo.
 */
export async function readPassword(ctx: CommandContext): Promise<string> {
  const stdin = ctx.stdin as NodeJS.ReadStream;
  if (stdin.isTTY && typeof stdin.setRawMode === 'function') {
    ctx.stderr.write('password: ');
    stdin.setRawMode(true);
    stdin.resume();
    try {
      return await new Promise<string>((resolve, reject) => {
        let line = '';
        const onData = (chunk: Buffer) => {
          for (const ch of chunk.toString('utf8')) {
            if (ch === '\r' || ch === '\n') {
              stdin.off('data', onData);
              ctx.stderr.write('\n');
              resolve(line);
              return;
            }
            if (ch === '\u0003') {
              stdin.off('data', onData);
              reject(new Error('cancelled'));
              return;
            }
            if (ch === '\u007f' || ch === '\b') line = [...line].slice(0, -1).join('');
            else line += ch;
          }
        };
        stdin.on('data', onData);
      });
    } finally {
      stdin.setRawMode(false);
      stdin.pause();
    }
  }
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of ctx.stdin) {
    const b = Buffer.isBuffer(chunk) ? chunk : Buffer.from(String(chunk));
    chunks.push(b);
    size += b.length;
    if (size > MAX_PASSWORD_LENGTH * 8) break;
  }
  const text = Buffer.concat(chunks).toString('utf8');
  return (text.split(/\r?\n/)[0] ?? '').replace(/^\uFEFF/, '');
}

async function service(ctx: CommandContext): Promise<AuthService> {
  return new AuthService(await ctx.db(), systemClock, DEFAULT_AUTH_POLICY);
}

/** Account changes made from the command line are audited like those made in the app. */
async function audit(
  ctx: CommandContext,
  action: string,
  userId: number,
  details?: Record<string, string | number | boolean | null>,
) {
  const actor = cliActor();
  await recordAudit(await ctx.db(), {
    userId: actor.userId,
    username: actor.username,
    action,
    entity: 'user',
    entityId: userId,
    ...(details ? { details } : {}),
  });
}

function failIfAppError(ctx: CommandContext, err: unknown): number {
  if (err instanceof AppError) {
    ctx.stderr.write(`phosledger: ${err.message} (${err.code})\n`);
    return 1;
  }
  throw err;
}

export const usersAdd: Command = {
  path: ['users', 'add'],
  usage: '<username> --role admin|dietitian   (password on stdin)',
  summary: 'create an account; the password is read from standard input',
  minPositionals: 1,
  options: { role: { type: 'string' } },
  async run(ctx) {
    const role = roleSchema.safeParse(ctx.args.values.role);
    if (!role.success) throw new UsageError('--role must be admin or dietitian');
    const password = await readPassword(ctx);
    if (!password) {
      ctx.stderr.write('phosledger: no password on standard input\n');
      return 1;
    }
    try {
      const auth = await service(ctx);
      const user = await auth.createUser(ctx.args.positionals[0]!, role.data, password);
      await audit(ctx, 'user.create', user.id, { role: user.role });
      ctx.stdout.write(`created ${user.role} ${user.username} (id ${user.id})\n`);
    } catch (err) {
      return failIfAppError(ctx, err);
    }
  },
};

export const usersList: Command = {
  path: ['users', 'list'],
  usage: '[--json]',
  summary: 'list accounts',
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const users = await (await service(ctx)).listUsers();
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(users, null, 2)}\n`);
      return;
    }
    if (users.length === 0) ctx.stdout.write('no accounts yet\n');
    for (const u of users) {
      ctx.stdout.write(
        `${String(u.id).padStart(4)}  ${u.username.padEnd(24)} ${u.role.padEnd(10)}${u.disabled ? ' disabled' : ''}  last sign-in ${u.lastSignInAt ?? 'never'}\n`,
      );
    }
  },
};

async function findByName(auth: AuthService, ctx: CommandContext) {
  const name = ctx.args.positionals[0]!.trim().toLowerCase();
  const user = (await auth.listUsers()).find((u) => u.username === name);
  if (!user) throw new AppError('PHL_AUTH_USER_NOT_FOUND', 404, `no account ${name}`);
  return user;
}

export const usersPassword: Command = {
  path: ['users', 'password'],
  usage: '<username>   (new password on stdin)',
  summary: "set an account's password and sign it out everywhere",
  minPositionals: 1,
  async run(ctx) {
    try {
      const auth = await service(ctx);
      const user = await findByName(auth, ctx);
      const password = await readPassword(ctx);
      await auth.setPassword(user.id, password);
      const n = await auth.signOutEverywhere(user.id);
      await audit(ctx, 'user.password-reset', user.id);
      ctx.stdout.write(`password set for ${user.username}; ${n} session(s) ended\n`);
    } catch (err) {
      return failIfAppError(ctx, err);
    }
  },
};

export const usersDisable: Command = {
  path: ['users', 'disable'],
  usage: '<username> [--enable]',
  summary: 'disable (or re-enable) an account; disabling signs it out everywhere',
  minPositionals: 1,
  options: { enable: { type: 'boolean' } },
  async run(ctx) {
    try {
      const auth = await service(ctx);
      const user = await findByName(auth, ctx);
      const disabled = !ctx.args.values.enable;
      await auth.updateUser(user.id, { disabled });
      await audit(ctx, 'user.update', user.id, { disabled });
      ctx.stdout.write(`${user.username} ${disabled ? 'disabled' : 'enabled'}\n`);
    } catch (err) {
      return failIfAppError(ctx, err);
    }
  },
};

export const usersUnlock: Command = {
  path: ['users', 'unlock'],
  usage: '<username> | --addresses',
  summary:
    "clear an account's failed sign-ins and lock (or every address lock): the admin's way back in",
  options: { addresses: { type: 'boolean' } },
  async run(ctx) {
    const auth = await service(ctx);
    const actor = cliActor();
    if (ctx.args.values.addresses) {
      const n = await auth.unlockAddresses();
      await recordAudit(await ctx.db(), {
        userId: actor.userId,
        username: actor.username,
        action: 'security.unlock-addresses',
        entity: 'session',
        details: { addresses: n },
      });
      ctx.stdout.write(`${n} address lock(s) cleared\n`);
      return;
    }
    const name = ctx.args.positionals[0];
    if (!name) throw new UsageError('give a username, or --addresses');
    try {
      const user = await findByName(auth, ctx);
      const had = await auth.unlockUser(user.username);
      await audit(ctx, 'user.unlock', user.id, { hadFailures: had });
      ctx.stdout.write(
        had
          ? `${user.username} unlocked: failed sign-ins cleared\n`
          : `${user.username} had no failed sign-ins\n`,
      );
    } catch (err) {
      return failIfAppError(ctx, err);
    }
  },
};

export const userCommands: Command[] = [
  usersAdd,
  usersList,
  usersPassword,
  usersDisable,
  usersUnlock,
];
