import type { Command } from '../cli/command.js';
import { rescanAdditives } from './additives.service.js';
import { ADDITIVE_CATALOGUE_VERSION } from './catalogue.js';
import { analyzeIngredients } from './ingredient-parser.js';

async function readAll(stream: NodeJS.ReadableStream): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream)
    chunks.push(typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Buffer));
  return Buffer.concat(chunks).toString('utf8');
}

export const ingredientsCheck: Command = {
  path: ['ingredients', 'check'],
  usage: '"<ingredient statement>" | - [--language LANG] [--json]',
  summary: 'list the phosphate additives an ingredient statement names',
  minPositionals: 1,
  options: { json: { type: 'boolean' }, language: { type: 'string' } },
  async run(ctx) {
    // "-" reads the statement from standard input (a copied label with its line breaks).
    const text =
      ctx.args.positionals.length === 1 && ctx.args.positionals[0] === '-'
        ? await readAll(ctx.stdin)
        : ctx.args.positionals.join(' ');
    const lang = ctx.args.values.language;
    const result = analyzeIngredients(text, typeof lang === 'string' ? lang : null);
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
      return;
    }
    if (result.additives.length === 0) {
      ctx.stdout.write('no phosphate additives found\n');
      return;
    }
    for (const a of result.additives) {
      ctx.stdout.write(
        `${a.counted ? 'COUNTED ' : 'noted   '} ${a.code.padEnd(22)} "${a.matchedText}" [${a.start}-${a.end}]  ${a.name}\n`,
      );
    }
    const counted = result.additives.filter((a) => a.counted).length;
    ctx.stdout.write(
      `${counted} counted as additive phosphorus, ${result.additives.length - counted} noted only ` +
        `(catalogue ${ADDITIVE_CATALOGUE_VERSION}). Estimates only; the care team decides.\n`,
    );
  },
};

export const ingredientsRescan: Command = {
  path: ['ingredients', 'rescan'],
  usage: '[--all] [--json]',
  summary: 'recompute the stored phosphate-additive scan of foods scanned with an older catalogue',
  options: { all: { type: 'boolean' }, json: { type: 'boolean' } },
  async run(ctx) {
    const db = await ctx.db();
    const result = await rescanAdditives(db, { all: ctx.args.values.all === true });
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
      return;
    }
    ctx.stdout.write(
      `catalogue ${result.catalogueVersion}: ${result.withStatement} foods with an ingredient statement, ` +
        `${result.rescanned} rescanned, ${result.alreadyCurrent} already current, ` +
        `${result.withCountedAdditives} of the rescanned name counted phosphate additives\n`,
    );
  },
};

export const ingredientsCommands: Command[] = [ingredientsCheck, ingredientsRescan];
