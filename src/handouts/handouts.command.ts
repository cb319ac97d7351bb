import { existsSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { UsageError, type Command } from '../cli/command.js';
import { systemClock } from '../clock.js';
import { AppError } from '../errors.js';
import { loadCataloguesOrThrow } from '../i18n/loader.js';
import { PAPER_SIZES, type PaperSize } from './handout.js';
import { HandoutService, handoutSourcesFromDb } from './handouts.service.js';

/** `phosledger plan print <planId> --lang es --out plan.pdf [--paper a4|letter]` */
export const planPrint: Command = {
  path: ['plan', 'print'],
  usage: '<planId> [--lang LANG] [--paper a4|letter] --out FILE.pdf [--force]',
  summary: "write a plan's patient handout as a PDF (in the patient's language unless --lang)",
  minPositionals: 1,
  options: {
    lang: { type: 'string' },
    paper: { type: 'string' },
    out: { type: 'string' },
    force: { type: 'boolean' },
  },
  async run(ctx) {
    const planId = Number(ctx.args.positionals[0]);
    if (!Number.isInteger(planId) || planId <= 0) {
      throw new UsageError('<planId> must be a positive whole number');
    }
    const out = ctx.args.values.out;
    if (typeof out !== 'string' || out.trim() === '')
      throw new UsageError('--out FILE.pdf is required');
    const paperText = ctx.args.values.paper ?? 'a4';
    if (typeof paperText !== 'string' || !(PAPER_SIZES as readonly string[]).includes(paperText)) {
      throw new UsageError('--paper must be a4 or letter');
    }
    const file = resolve(out);
    if (existsSync(file) && ctx.args.values.force !== true) {
      ctx.stderr.write(
        `phosledger: ${file} already exists; nothing written (add --force to replace it)\n`,
      );
      return 1;
    }
    const lang = typeof ctx.args.values.lang === 'string' ? ctx.args.values.lang : undefined;
    const db = await ctx.db();
    const languages = loadCataloguesOrThrow();
    const service = new HandoutService(
      handoutSourcesFromDb(db, systemClock, languages.list()),
      languages,
      systemClock,
    );
    try {
      const pdf = await service.pdf(planId, { lang, paper: paperText as PaperSize });
      writeFileSync(file, pdf.bytes);
      const review =
        pdf.status.review.status === 'reviewed'
          ? 'reviewed by a medical translator'
          : 'translation drafted, not reviewed by a medical translator: check it before handing it out';
      ctx.stdout.write(
        `wrote ${file} (${pdf.pageCount} pages, ${pdf.language}, ${paperText}; ${review})\n`,
      );
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message} (${err.code})\n`);
        return 1;
      }
      throw err;
    }
  },
};

export const handoutCommands: Command[] = [planPrint];
