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
import type { PreparedAmounts } from '../preparation/apply.js';
import { diaryPreparation } from '../preparation/diary-words.js';
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
import { handfulToGrams } from './handful.js';
import {
  addedPortion,
  defaultPortion,
  quantityToGrams,
  type GramsResult,
  type Quantity,
} from './quantity.js';
import { entryKey, type DiaryEntryInput } from './reader.js';

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
  /** Which food of the line (0 = the first or only one). */
  part: number;
  /** The entry's name for confirming or changing it: "12", or "12.1" for the line's second food. */
  key: string;
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
  /** False while the entry waits for review (see `review`): it is left out of the day totals. */
  counted: boolean;
  /** Why the entry waits for review; empty when it is counted. */
  review: string[];
}

/** An entry left out of the totals until the reviewer confirms its food or enters its amount. */
export interface DiaryReviewItem {
  key: string;
  line: number;
  part: number;
  text: string;
  reasons: string[];
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
  /** Entries of the day waiting for review (not in the totals). */
  reviewCount: number;
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
  /** Entries left out of the totals until reviewed, in diary order. */
  review: DiaryReviewItem[];
  status: 'complete' | 'incomplete';
  skipped: DiaryIssueReport[];
  notes: DiaryIssueReport[];
  hiddenAdditiveEntries: number[];
  targetsSource: 'patient' | 'none';
  caution: string;
  /** Clinical cautions (potassium on dialysis, protein under target, additive variability). */
  cautions?: ClinicalCaution[];
}

/**
 * A match found by the food's words with a confidence under this is listed for review and left
 * out of the totals until the reviewer confirms it (the product's own threshold, no source: on
 * the labelled set most matches under it are guesses).
 */
export const REVIEW_BELOW_CONFIDENCE = 0.5;

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

interface DayCounts {
  entries: number;
  unmatched: number;
  review: number;
}

/**
 * The grams of one matched entry and why it must wait for review, if it must: a weak match, a
 * negative amount, or a handful of a food a handful does not measure. The reviewer's amount
 * replaces the diary's own; a confirmed food is never held back for its confidence.
 */
function entryAmount(
  e: DiaryEntryInput,
  food: Food,
  m: EntryMatchInput,
  entered: Quantity | undefined,
  cache: Map<string, GramsResult>,
): { grams: GramsResult | null; review: string[] } {
  const review: string[] = [];
  if (m.method === 'text' && m.confidence < REVIEW_BELOW_CONFIDENCE) {
    review.push(
      `the food was matched at ${Math.round(m.confidence * 100)}% confidence, under the ${REVIEW_BELOW_CONFIDENCE * 100}% an entry needs to count without review: confirm or change it`,
    );
  }
  if (entered) {
    const grams = quantityToGrams(entered, food, memoryKey(e.foodText).split(' '));
    return { grams: { ...grams, note: `amount entered by the reviewer: ${grams.note}` }, review };
  }
  if (e.negativeAmount) {
    review.push(`the amount '${e.negativeAmount}' is negative: enter the amount eaten`);
    return { grams: null, review };
  }
  if (e.quantity?.unit === 'handful') {
    const h = handfulToGrams(e.quantity, food);
    if (!h.ok) {
      review.push(h.question);
      return { grams: null, review };
    }
    return { grams: h.grams, review };
  }
  const gramsKey = `${food.id}|${e.quantityUnreadable}|${e.addedTo === true}|${e.quantityText ?? ''}|${e.foodText}`;
  let grams = cache.get(gramsKey);
  if (!grams || food !== m.food) {
    const entryWords = memoryKey(e.foodText).split(' ');
    grams = e.quantityUnreadable
      ? defaultPortion(food, `quantity '${e.quantityText ?? ''}' not understood`)
      : e.quantity === null && e.addedTo
        ? addedPortion(food)
        : quantityToGrams(e.quantity, food, entryWords);
    cache.set(gramsKey, grams);
  }
  return { grams, review };
}

export interface BuildInput {
  entries: readonly DiaryEntryInput[];
  /** Matches by `entryKey`. */
  matches: ReadonlyMap<string, EntryMatchInput>;
  /** Amounts the reviewer entered, by `entryKey`: they replace the diary's own. */
  quantities?: ReadonlyMap<string, Quantity>;
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
  const dayCounts = new Map<string, DayCounts>();
  // One profile per food (a diary repeats its foods); an entry's own statement makes a new food.
  const profiles = new Map<Food, PhosphorusProfile>();
  const gramsCache = new Map<string, GramsResult>();

  for (const e of entries) {
    const key = dayKey(e);
    if (!byDay.has(key)) {
      byDay.set(key, new Map());
      dayOrder.push(key);
      dayDates.set(key, e.date);
      dayCounts.set(key, { entries: 0, unmatched: 0, review: 0 });
    }
    const counts = dayCounts.get(key) as DayCounts;
    counts.entries++;
    const ek = entryKey(e);
    const m = matches.get(ek) ?? {
      food: null,
      method: 'none' as const,
      confidence: 0,
      candidates: [],
      notes: [],
    };
    const findings = [...e.flags, ...m.notes];
    const base = {
      line: e.line,
      part: e.part ?? 0,
      key: ek,
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
        counted: false,
        review: [],
      });
      continue;
    }
    const food = entryFood(m.food, e);
    const amount = entryAmount(e, food, m, input.quantities?.get(ek), gramsCache);
    const grams = amount.grams;
    let profile = profiles.get(food);
    if (!profile) {
      profile = profileFood(food, settings.absorption);
      profiles.set(food, profile);
    }
    // A cooking word ("boiled", "hervido"...) on a raw entry: counted boiled and drained.
    const cooking = grams
      ? diaryPreparation(e.foodText, food, profile, settings.absorption, grams.grams)
      : null;
    if (cooking) findings.push(cooking.finding);
    const scaled = grams
      ? preparedScale(scaleProfile(profile, grams.grams), cooking?.amounts ?? null)
      : null;
    const hidden = profile.additiveLikely && !profile.additiveEvidentFromName;
    if (grams?.assumed) findings.push(`portion assumed: ${grams.note}`);
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
    const counted = amount.review.length === 0 && grams !== null;
    if (counted) {
      // Summary ids: a food eaten with the diary's own ingredient statement is its own variant.
      const summaryId = e.ingredients ? -(e.line * 100 + (e.part ?? 0)) : food.id;
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
        ...(cooking?.item ?? {}),
      });
    } else {
      counts.review++;
      findings.push('waiting for review: not counted in the totals until confirmed');
    }
    reports.push({
      ...base,
      match: { foodId: m.food.id, name: m.food.name, confidence: m.confidence },
      grams: grams?.grams ?? null,
      quantityAssumed: grams?.assumed ?? false,
      quantityNote: grams?.note ?? null,
      phosphorusMg: scaled?.totalMg == null ? null : r1(scaled.totalMg),
      absorbablePhosphorusMg: scaled?.absorbableMg
        ? {
            low: r1(scaled.absorbableMg.low),
            typical: r1(scaled.absorbableMg.typical),
            high: r1(scaled.absorbableMg.high),
          }
        : null,
      additivePhosphorusMg: scaled?.additiveMg == null ? null : r1(scaled.additiveMg),
      hidden,
      additiveLikely: profile.additiveLikely,
      splitMethod: profile.method,
      findings,
      counted,
      review: amount.review,
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
    const counts = dayCounts.get(label) as DayCounts;
    const status = { ...d.status, messages: [...d.status.messages] };
    if (counts.unmatched > 0) {
      status.messages.push(
        `${counts.unmatched} of ${counts.entries} entries not matched: the totals are too low by their amount`,
      );
    }
    if (counts.review > 0) {
      status.messages.push(
        `${counts.review} of ${counts.entries} entries wait for review and are not in the totals yet`,
      );
    }
    return {
      date: dayDates.get(label) ?? null,
      label,
      entryCount: counts.entries,
      unmatchedCount: counts.unmatched,
      reviewCount: counts.review,
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
    review: reports
      .filter((r) => r.review.length > 0)
      .map((r) => ({ key: r.key, line: r.line, part: r.part, text: r.text, reasons: r.review })),
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

/** The entry's scaled profile with the amounts after its preparation, when it has one. */
function preparedScale(
  scaled: ReturnType<typeof scaleProfile>,
  prepared: PreparedAmounts | null,
): ReturnType<typeof scaleProfile> {
  if (!prepared) return scaled;
  return {
    ...scaled,
    totalMg: prepared.phosphorusMg?.typical ?? scaled.totalMg,
    absorbableMg: prepared.absorbablePhosphorusMg ?? scaled.absorbableMg,
    additiveMg: prepared.additivePhosphorusMg,
  };
}
