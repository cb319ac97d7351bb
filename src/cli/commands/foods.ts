import { FoodRepository } from '../../foods/foods.repository.js';
import { FoodService } from '../../foods/foods.service.js';
import { toFoodHit, toFoodJson } from '../../foods/food.json.js';
import { toPhosphorusJson } from '../../phosphorus/phosphorus.json.js';
import { PhosphorusService } from '../../phosphorus/phosphorus.service.js';
import { toFoodPreparationJson } from '../../preparation/preparation.json.js';
import { UsageError, type Command } from '../command.js';

function fmt(n: number | null, digits = 0): string {
  return n === null ? '-' : n.toFixed(digits);
}

export const foodsSearch: Command = {
  path: ['foods', 'search'],
  usage: '<text> [--limit N] [--source FORMAT] [--json]',
  summary: 'search foods by name, code or barcode',
  minPositionals: 1,
  options: { json: { type: 'boolean' }, limit: { type: 'string' }, source: { type: 'string' } },
  async run(ctx) {
    const db = await ctx.db();
    const limitText = ctx.args.values.limit;
    const limit = typeof limitText === 'string' ? Number(limitText) : 20;
    if (!Number.isInteger(limit) || limit < 1 || limit > 100) {
      throw new UsageError('--limit must be a whole number from 1 to 100');
    }
    const source = ctx.args.values.source;
    const service = new FoodService(new FoodRepository(db.kysely));
    const foods = await service.search({
      q: ctx.args.positionals.join(' '),
      limit,
      ...(typeof source === 'string' ? { source } : {}),
    });
    const profiles = await new PhosphorusService(db).profiles(foods);
    const hits = foods.map((f) => {
      const profile = profiles.get(f.id);
      return { ...toFoodHit(f), phosphorus: profile ? toPhosphorusJson(profile) : null };
    });
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(hits, null, 2)}\n`);
      return;
    }
    if (hits.length === 0) {
      ctx.stdout.write('no foods found\n');
      return;
    }
    for (const h of hits) {
      ctx.stdout.write(
        `${String(h.id).padStart(7)}  ${h.source}:${h.code}  ${h.name}  ` +
          `P ${fmt(h.per100g.phosphorusMg)} mg, protein ${fmt(h.per100g.proteinG, 1)} g /100 g, ` +
          `P:protein ${fmt(h.phosphorusProteinRatioMgPerG, 1)} mg/g\n`,
      );
    }
  },
};

export const foodsShow: Command = {
  path: ['foods', 'show'],
  usage: '<id> [--json]',
  summary: 'show one food with its nutrients, portions and provenance',
  minPositionals: 1,
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const id = Number(ctx.args.positionals[0]);
    if (!Number.isInteger(id) || id <= 0)
      throw new UsageError('<id> must be a positive whole number');
    const db = await ctx.db();
    const repo = new FoodRepository(db.kysely);
    const food = await repo.getFood(id);
    if (!food) {
      ctx.stderr.write(`phosledger: food ${id} not found\n`);
      return 1;
    }
    const source = await repo.getProvenance(food.sourceId);
    const profile = await new PhosphorusService(db).profile(food);
    const json = {
      ...toFoodJson(food),
      phosphorus: toPhosphorusJson(profile),
      ...toFoodPreparationJson(food),
      provenance: source
        ? {
            table: source.name,
            format: source.format,
            release: source.release,
            licence: source.licence,
          }
        : null,
    };
    if (ctx.args.values.json) {
      ctx.stdout.write(`${JSON.stringify(json, null, 2)}\n`);
      return;
    }
    const p = food.per100g;
    ctx.stdout.write(
      [
        `${food.name}  (${food.source}:${food.code}, ${food.kind})`,
        `group: ${food.group ?? '-'}`,
        `per 100 g: P ${fmt(p.phosphorusMg)} mg, protein ${fmt(p.proteinG, 1)} g, ` +
          `energy ${fmt(p.energyKcal)} kcal, K ${fmt(p.potassiumMg)} mg, Na ${fmt(p.sodiumMg)} mg, ` +
          `Ca ${fmt(p.calciumMg)} mg, water ${fmt(p.waterG, 1)} g, phytate ${fmt(p.phytateMg)} mg`,
        ...food.portions.map((x) => `  portion: ${x.amount} ${x.description} = ${x.grams} g`),
        `state: ${json.cookedState} (${json.cookedStateBasis})`,
        ...json.preparations.map(
          (m) =>
            `  preparation ${m.method} (${m.label}): P x${m.factors.phosphorus.typical}, ` +
            `K x${m.factors.potassium.typical}, protein x${m.factors.protein.typical}`,
        ),
        food.ingredients ? `ingredients: ${food.ingredients}` : '',
        source ? `source: ${source.name} ${source.release} (${source.licence})` : '',
      ]
        .filter(Boolean)
        .join('\n') + '\n',
    );
  },
};
