import cliProgress from 'cli-progress';
import {
  unpackLimitsFromEnv,
  type ImportIssue,
  type ImportProgress,
} from '../../../data-import/importer.js';
import { ProgressThrottle, progressLine } from '../../../data-import/progress-line.js';
import { findImporter, importers } from '../../../data-import/registry.js';
import { auditImport, cliActor } from '../../audit/actors.js';
import { UsageError, type Command } from '../command.js';

const n = (x: number) => x.toLocaleString('en-US');
const where = (i: ImportIssue) => `${i.file}${i.line !== null ? `:${i.line}` : ''}`;
/** How many row problems are printed; the rest are counted. */
const SHOWN_ISSUES = 20;

function formatsText(): string {
  return importers
    .map(
      (i) =>
        `  ${i.format.padEnd(13)} ${i.title}\n${' '.repeat(16)}path: ${i.pathHint}\n${' '.repeat(16)}get it: ${i.where}`,
    )
    .join('\n');
}

export const importCommand: Command = {
  path: ['import'],
  usage: `<${importers.map((i) => i.format).join('|')}> <path> [--release NAME] [--json]`,
  summary: 'import a food table (one transaction: a failed import changes nothing)',
  minPositionals: 1,
  options: { release: { type: 'string' }, json: { type: 'boolean' } },
  async run(ctx) {
    const [format, path, extra] = ctx.args.positionals;
    const importer = findImporter(format ?? '');
    if (!importer) {
      throw new UsageError(`unknown format '${format}'; the formats are:\n${formatsText()}`);
    }
    if (!path && !importer.pathOptional) {
      throw new UsageError(`${importer.format} needs a path: ${importer.pathHint}`);
    }
    if (extra !== undefined) throw new UsageError(`one path only (got '${extra}' too)`);
    const release = ctx.args.values.release;
    if (release !== undefined && (typeof release !== 'string' || release.trim() === '')) {
      throw new UsageError('--release needs a name');
    }
    const db = await ctx.db();
    const tty = (ctx.stderr as NodeJS.WriteStream).isTTY === true && !ctx.args.values.json;
    const bar = tty
      ? new cliProgress.SingleBar(
          {
            format: `${importer.format} [{bar}] {percentage}% | {file} | {rows} rows`,
            stream: ctx.stderr as NodeJS.WriteStream,
            hideCursor: true,
            clearOnComplete: true,
          },
          cliProgress.Presets.shades_classic,
        )
      : null;
    let started = false;
    // Without a terminal (a log, a service) or with --json: a line on stderr every few seconds.
    const throttle = new ProgressThrottle();
    const json = ctx.args.values.json === true;
    const onProgress = (p: ImportProgress) => {
      if (!bar) {
        if (throttle.due(p, Date.now()))
          ctx.stderr.write(`${progressLine(importer.format, p, json)}\n`);
        return;
      }
      const payload = { file: p.file, rows: n(p.rows) };
      if (!started) {
        bar.start(p.bytesTotal || 1, p.bytesDone, payload);
        started = true;
      }
      bar.setTotal(p.bytesTotal || 1);
      bar.update(p.bytesDone, payload);
    };
    let limits;
    try {
      limits = unpackLimitsFromEnv(process.env);
    } catch (err) {
      throw new UsageError((err as Error).message);
    }
    const result = await importer.run(db, path, {
      ...(typeof release === 'string' ? { release: release.trim() } : {}),
      onProgress,
      limits,
    });
    if (started) bar?.stop();
    await auditImport(db, result, cliActor());
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
      return result.ok ? 0 : 1;
    }
    for (const issue of result.errors.slice(0, SHOWN_ISSUES)) {
      ctx.stderr.write(`  ${where(issue)}  ${issue.code}  ${issue.message}\n`);
    }
    if (result.issueCount > SHOWN_ISSUES) {
      ctx.stderr.write(
        `  ... and ${n(result.issueCount - SHOWN_ISSUES)} more row problems (--json lists ${n(result.errors.length)})\n`,
      );
    }
    for (const note of result.notes) ctx.stderr.write(`  note: ${note}\n`);
    if (!result.ok) {
      ctx.stderr.write(
        `phosledger: import stopped at ${where(result.fatal)}: ${result.fatal.message} [${result.fatal.code}]\n` +
          'the database was not changed\n',
      );
      return 1;
    }
    ctx.stdout.write(
      `imported ${result.format} ${result.release}: ${n(result.imported)} foods, ${n(result.values)} values, ` +
        `${n(result.portions)} portions; ${n(result.skipped)} rows skipped\n`,
    );
    return 0;
  },
};
