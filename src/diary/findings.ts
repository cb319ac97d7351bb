/**
 * Pure diary findings: per entry the grams, phosphorus, absorbable range, additive phosphorus with
 * its evidence and whether the additive is hidden; per day the totals against the targets and the
 * top contributors (through the plan summary, so diary and plan days add up the same way).
 */
import { clinicalCautions, type ClinicalCaution } from '../plans/cautions.js';
import type { Food } from '../foods/food.js';
import type { Targets } from '../patients/targets.js';
import { guessOccasionKind, type PlanDay } from '../plans/plan.js';
import { summarizePlan } from '../plans/summary.js';
import type {
  Contributor,
  DayStatus,
  MgRange,
  Nutrients,
  SummarySettings,
} from '../plans/summary-types.js';
import { profileFood, scaleProfile, type PhosphorusProfile } from '../phosphorus/profile.js';
import { memoryKey } from './matcher.js';
import type { Candidate, MatchMethod } from './matching.service.js';
import { defaultPortion, quantityToGrams, type GramsResult } from './quantity.js';
import type { DiaryEntryInput } from './reader.js';

/** Where an entry's food came from, as the report shows it. */
export interface EntryMatchInput {
  food: Food | null;
  method: MatchMethod | 'confirmed';
  confidence: number;
  candidates: Candidate[];
  notes: string[];
}

export interface DiaryEntryReport {
  line: number;
  text: string;
  date: string | null;
  day: string;
  occasion: string | null;
  time: string | null;
  match: { foodId: number; name: string; confidence: number } | null;
  matchMethod: MatchMethod | 'confirmed';
  candidates: Candidate[];
  grams: number | null;
  quantityAssumed: boolean;
  quantityNote: string | null;
  phosphorusMg: number | null;
  absorbablePhosphorusMg: MgRange | null;
  additivePhosphorusMg: number | null;
  /** Phosphate additive likely, and nothing in the food's own name says so. */
  hidden: boolean;
  additiveLikely: boolean;
  splitMethod: string | null;
  findings: string[];
}

export interface DiarySwap {
  foodId: number;
  name: string;
  swaps: { foodId: number; name: string; shareOfOriginal: number; additiveLikely: boolean }[];
  rule: string;
}

export interface DiaryDayReport {
  date: string | null;
  label: string;
  entryCount: number;
  unmatchedCount: number;
  nutrients: Nutrients;
  status: DayStatus;
  topContributors: Contributor[];
  swaps: DiarySwap[];
}

export interface DiaryIssueReport {
  line: number;
  code: string;
  message: string;
}

/** The whole report; `entries`, `days` and `unmatched` are the fixed JSON contract. */
export interface DiaryReport {
  entries: DiaryEntryReport[];
  days: DiaryDayReport[];
  unmatched: number[];
  status: 'complete' | 'incomplete';
  skipped: DiaryIssueReport[];
  notes: DiaryIssueReport[];
  hiddenAdditiveEntries: number[];
  targetsSource: 'patient' | 'none';
  caution: string;
  /** Clinical cautions (potassium on dialysis, protein under target, additive variability). */
  cautions?: ClinicalCaution[];
}

export const DIARY_CAUTION =
  'Estimates from a food diary matched to food-table values, with assumed absorption fractions: check the matches and portions, and discuss with the care team before changing a diet or a binder.';

const r1 = (x: number) => Math.round(x * 10) / 10;

/** The day an entry belongs to: its date, else the diary's own day name, else one unnamed day. */
export function dayKey(e: Pick<DiaryEntryInput, 'date' | 'dayLabel'>): string {
  return e.date ?? (e.dayLabel || 'Day 1');
}

/** Targets for an audit without a patient: none set, said so plainly. */
export function unsetTargets(): Targets {
  const none = (unit: 'g/day' | 'kcal/day' | 'mg/day' | 'mL/day') => ({
    min: null,
    max: null,
    unit,
    perKg: null,
    setBy: 'unset' as const,
    source: 'no patient linked to this audit: no targets',
    defaultValue: null,
    note: 'Link the audit to a patient to compare the days with their targets.',
  });
  return {
    proteinG: none('g/day'),
    energyKcal: none('kcal/day'),
    sodiumMg: none('mg/day'),
    phosphorusMg: none('mg/day'),
    potassiumMg: none('mg/day'),
    calciumMg: none('mg/day'),
    fluidMl: none('mL/day'),
  };
}

/** The food as this entry ate it: the diary's own ingredient statement replaces the table's. */
function entryFood(food: Food, entry: DiaryEntryInput): Food {
  if (!entry.ingredients) return food;
  return { ...food, ingredients: entry.ingredients, ingredientsLanguage: null };
}

export interface BuildInput {
  entries: readonly DiaryEntryInput[];
  matches: ReadonlyMap<number, EntryMatchInput>;
  settings: SummarySettings;
  targets: Targets;
  targetsSource: 'patient' | 'none';
  skipped: readonly DiaryIssueReport[];
  notes: readonly DiaryIssueReport[];
}

/**
 * Builds the report (pure). Grams come from the quantity parser and the food's own measures;
 * phosphorus from the phosphorus profile scaled to the grams; day totals from the plan summary.
 */
export function buildDiaryReport(input: BuildInput): Omit<DiaryReport, 'days'> & {
  days: Omit<DiaryDayReport, 'swaps'>[];
} {
  const { entries, matches, settings } = input;
  const reports: DiaryEntryReport[] = [];
  const foodsForSummary = new Map<number, Food>();
  const realId = new Map<number, number>();
  const dayOrder: string[] = [];
  const byDay = new Map<string, Map<string, PlanDay['occasions'][number]>>();
  const dayDates = new Map<string, string | null>();
  const dayCounts = new Map<string, { entries: number; unmatched: number }>();
  // One profile per food (a diary repeats its foods); an entry's own statement makes a new food.
  const profiles = new Map<Food, PhosphorusProfile>();
  const gramsCache = new Map<string, GramsResult>();

  for (const e of entries) {
    const key = dayKey(e);
    if (!byDay.has(key)) {
      byDay.set(key, new Map());
      dayOrder.push(key);
      dayDates.set(key, e.date);
      dayCounts.set(key, { entries: 0, unmatched: 0 });
    }
    const counts = dayCounts.get(key) as { entries: number; unmatched: number };
    counts.entries++;
    const m = matches.get(e.line) ?? {
      food: null,
      method: 'none' as const,
      confidence: 0,
      candidates: [],
      notes: [],
    };
    const findings = [...e.flags, ...m.notes];
    const base = {
      line: e.line,
      text: e.text,
      date: e.date,
      day: key,
      occasion: e.occasion,
      time: e.time,
      matchMethod: m.method,
      candidates: m.candidates,
    };
    if (!m.food) {
      counts.unmatched++;
      findings.push('not matched to a food: not counted in the totals');
      reports.push({
        ...base,
        match: null,
        grams: null,
        quantityAssumed: false,
        quantityNote: null,
        phosphorusMg: null,
        absorbablePhosphorusMg: null,
        additivePhosphorusMg: null,
        hidden: false,
        additiveLikely: false,
        splitMethod: null,
        findings,
      });
      continue;
    }
    const food = entryFood(m.food, e);
    const gramsKey = `${food.id}|${e.quantityUnreadable}|${e.quantityText ?? ''}|${e.foodText}`;
    let grams = gramsCache.get(gramsKey);
    if (!grams || food !== m.food) {
      const entryWords = memoryKey(e.foodText).split(' ');
      grams = e.quantityUnreadable
        ? defaultPortion(food, `quantity '${e.quantityText ?? ''}' not understood`)
        : quantityToGrams(e.quantity, food, entryWords);
      gramsCache.set(gramsKey, grams);
    }
    let profile = profiles.get(food);
    if (!profile) {
      profile = profileFood(food, settings.absorption);
      profiles.set(food, profile);
    }
    const scaled = scaleProfile(profile, grams.grams);
    const hidden = profile.additiveLikely && !profile.additiveEvidentFromName;
    if (grams.assumed) findings.push(`portion assumed: ${grams.note}`);
    if (profile.additiveLikely) {
      findings.push(
        hidden
          ? 'hidden phosphate additive: nothing in the food name says so'
          : 'phosphate additive: the food name says so',
      );
    }
    findings.push(...profile.evidence);
    if (profile.totalMg === null)
      findings.push('the food table has no phosphorus value for this food');
    // Summary ids: a food eaten with the diary's own ingredient statement is its own variant.
    const summaryId = e.ingredients ? -e.line : food.id;
    foodsForSummary.set(summaryId, summaryId < 0 ? { ...food, id: summaryId } : food);
    realId.set(summaryId, food.id);
    const occName = e.occasion ?? 'unspecified';
    const occasions = byDay.get(key) as Map<string, PlanDay['occasions'][number]>;
    let occ = occasions.get(occName);
    if (!occ) {
      occ = { name: occName, kind: guessOccasionKind(occName), time: e.time, items: [] };
      occasions.set(occName, occ);
    }
    occ.items.push({
      foodId: summaryId,
      grams: grams.grams,
      measure: null,
      label: e.text.slice(0, 120),
    });
    reports.push({
      ...base,
      match: { foodId: m.food.id, name: m.food.name, confidence: m.confidence },
      grams: grams.grams,
      quantityAssumed: grams.assumed,
      quantityNote: grams.note,
      phosphorusMg: scaled.totalMg === null ? null : r1(scaled.totalMg),
      absorbablePhosphorusMg: scaled.absorbableMg
        ? {
            low: r1(scaled.absorbableMg.low),
            typical: r1(scaled.absorbableMg.typical),
            high: r1(scaled.absorbableMg.high),
          }
        : null,
      additivePhosphorusMg: scaled.additiveMg === null ? null : r1(scaled.additiveMg),
      hidden,
      additiveLikely: profile.additiveLikely,
      splitMethod: profile.method,
      findings,
    });
  }

  const plan = {
    planId: 0,
    patientId: 0,
    version: 0,
    name: 'diary',
    days: dayOrder.map((label) => ({
      label,
      occasions: [...(byDay.get(label) as Map<string, PlanDay['occasions'][number]>).values()],
    })),
  };
  const summary = summarizePlan(plan, foodsForSummary, input.targets, settings, null);
  const days = summary.days.map((d, i) => {
    const label = dayOrder[i] as string;
    const counts = dayCounts.get(label) as { entries: number; unmatched: number };
    const status = { ...d.status, messages: [...d.status.messages] };
    if (counts.unmatched > 0) {
      status.messages.push(
        `${counts.unmatched} of ${counts.entries} entries not matched: the totals are too low by their amount`,
      );
    }
    return {
      date: dayDates.get(label) ?? null,
      label,
      entryCount: counts.entries,
      unmatchedCount: counts.unmatched,
      nutrients: d.nutrients,
      status,
      topContributors: d.topContributors.map((c) => ({
        ...c,
        foodId: realId.get(c.foodId) ?? c.foodId,
      })),
    };
  });
  const unmatched = reports.filter((r) => r.match === null).map((r) => r.line);
  return {
    entries: reports,
    days,
    unmatched,
    status: input.skipped.length > 0 ? 'incomplete' : 'complete',
    skipped: [...input.skipped],
    notes: [...input.notes],
    hiddenAdditiveEntries: reports.filter((r) => r.hidden).map((r) => r.line),
    targetsSource: input.targetsSource,
    caution: DIARY_CAUTION,
    cautions: clinicalCautions({
      targets: input.targets,
      proteinBelowTarget: days.some((d) =>
        d.status.checks.some((c) => c.target === 'proteinG' && c.status === 'below'),
      ),
    }),
  };
}
