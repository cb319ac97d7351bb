import { FoodRepository } from '../../foods/foods.repository.js';
import type { Command } from '../command.js';

export const dbMigrate: Command = {
  path: ['db', 'migrate'],
  usage: '',
  summary: 'create or upgrade the database schema',
  async run(ctx) {
    await ctx.db(); // opening migrates
    ctx.stdout.write(`database ready: ${ctx.config.dbFile}\n`);
  },
};

export const sources: Command = {
  path: ['sources'],
  usage: '[--json]',
  summary: 'list imported food tables with counts',
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const db = await ctx.db();
    const rows = await new FoodRepository(db.kysely).listSources();
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(rows, null, 2)}\n`);
      return;
    }
    if (rows.length === 0) ctx.stdout.write('no food tables imported yet\n');
    for (const r of rows) {
      ctx.stdout.write(
        `${r.format.padEnd(12)} ${r.release.padEnd(24)} foods ${r.food_count}, values ${r.nutrient_value_count}, ` +
          `portions ${r.portion_count}, skipped ${r.skipped_count}; imported ${r.imported_at}; ${r.licence}\n`,
      );
    }
  },
};
