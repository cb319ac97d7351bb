/**
 * The plan being edited in the plate ledger, as plain data with pure operations (no DOM, no
 * fetch), so the builder's logic is tested without a browser.
 */
export interface DraftItem {
  foodId: number;
  /** Edible grams of this item (what the summary computes from). */
  grams: number;
  /** The household measure the quantity was given in (count of that measure), or null for grams. */
  measure: { portionId: number; count: number; description?: string; gramsPerUnit?: number } | null;
  /** The words the patient uses for this food, in their language. */
  label?: string | null;
  /** A preparation method id ('boil-drain', ...); absent or null = as the table lists it. */
  preparation?: string | null;
  /** With a method: whether the grams are of the food as listed (raw) or on the plate (cooked). */
  weightBasis?: 'table' | 'plate';
}
export interface DraftOccasion {
  name: string;
  kind?: 'meal' | 'snack';
  time?: string | null;
  items: DraftItem[];
}
export interface DraftDay {
  label: string;
  occasions: DraftOccasion[];
}
export interface PlanDraft {
  name: string;
  days: DraftDay[];
}

/** A household measure as the food tables give it: `amount` of `description` weighs `grams`. */
export interface Measure {
  id: number;
  description: string;
  grams: number;
  amount?: number;
}

/** Default occasions of a new day (common practice, no source). */
export const DEFAULT_OCCASIONS = ['Breakfast', 'Lunch', 'Afternoon snack', 'Dinner'];

/** Largest quantity of one item the plans API accepts (5 kg). */
export const MAX_ITEM_GRAMS = 5000;

export function newDay(index: number): DraftDay {
  return {
    label: `Day ${index + 1}`,
    occasions: DEFAULT_OCCASIONS.map((name) => ({ name, items: [] })),
  };
}

/**
 * Grams for `amount` of a measure, or `amount` grams when no measure is chosen. A table's measure
 * of "0.5 cup = 120 g" has grams per 1 listed amount of 120/0.5 (USDA SR28 WEIGHT.txt Amount and
 * Gm_Wgt fields); result rounded to 0.1 g.
 */
export function gramsFor(amount: number, measure: Measure | null): number {
  if (!measure) return round1(amount);
  const per = measure.grams / (measure.amount && measure.amount > 0 ? measure.amount : 1);
  return round1(amount * per);
}

export type Checked = { ok: true; grams: number } | { ok: false; message: string };

/** Validates an entered quantity before it reaches the plan. */
export function checkQuantity(amount: number, measure: Measure | null): Checked {
  if (!Number.isFinite(amount) || amount <= 0)
    return { ok: false, message: 'Quantity must be more than 0.' };
  const grams = gramsFor(amount, measure);
  if (grams <= 0) return { ok: false, message: 'Quantity must be more than 0 g.' };
  if (grams > MAX_ITEM_GRAMS)
    return { ok: false, message: `One item can weigh at most ${MAX_ITEM_GRAMS} g (5 kg).` };
  return { ok: true, grams };
}

function round1(n: number): number {
  return Math.round(n * 10) / 10;
}

function mapDay(d: PlanDraft, day: number, fn: (x: DraftDay) => DraftDay): PlanDraft {
  return { ...d, days: d.days.map((x, i) => (i === day ? fn(x) : x)) };
}
function mapOccasion(
  d: PlanDraft,
  day: number,
  occ: number,
  fn: (o: DraftOccasion) => DraftOccasion,
): PlanDraft {
  return mapDay(d, day, (x) => ({
    ...x,
    occasions: x.occasions.map((o, j) => (j === occ ? fn(o) : o)),
  }));
}

export function addItem(d: PlanDraft, day: number, occ: number, item: DraftItem): PlanDraft {
  return mapOccasion(d, day, occ, (o) => ({ ...o, items: [...o.items, item] }));
}
export function removeItem(d: PlanDraft, day: number, occ: number, index: number): PlanDraft {
  return mapOccasion(d, day, occ, (o) => ({ ...o, items: o.items.filter((_, k) => k !== index) }));
}
export function updateItem(
  d: PlanDraft,
  day: number,
  occ: number,
  index: number,
  patch: Partial<DraftItem>,
): PlanDraft {
  return mapOccasion(d, day, occ, (o) => ({
    ...o,
    items: o.items.map((it, k) => (k === index ? { ...it, ...patch } : it)),
  }));
}
export function addDay(d: PlanDraft): PlanDraft {
  return { ...d, days: [...d.days, newDay(d.days.length)] };
}
export function addOccasion(d: PlanDraft, day: number, name: string): PlanDraft {
  return mapDay(d, day, (x) => ({ ...x, occasions: [...x.occasions, { name, items: [] }] }));
}
export function itemCount(d: PlanDraft, day: number): number {
  return d.days[day]?.occasions.reduce((n, o) => n + o.items.length, 0) ?? 0;
}

/** The body `POST /api/plans` and `PUT /api/plans/:id` take: grams or a measure, never both. */
export function toPlanInput(d: PlanDraft) {
  return {
    name: d.name,
    days: d.days.map((day) => ({
      label: day.label,
      occasions: day.occasions.map((o) => ({
        name: o.name,
        ...(o.kind ? { kind: o.kind } : {}),
        ...(o.time ? { time: o.time } : {}),
        items: o.items.map((it) => ({
          foodId: it.foodId,
          ...(it.measure
            ? { measure: { portionId: it.measure.portionId, count: it.measure.count } }
            : { grams: it.grams }),
          ...(it.label ? { label: it.label } : {}),
          ...(it.preparation ? { preparation: it.preparation } : {}),
          ...(it.preparation && it.preparation !== 'as-listed' && it.weightBasis
            ? { weightBasis: it.weightBasis }
            : {}),
        })),
      })),
    })),
  };
}

/**
 * Copies one day's meals onto other days (their own labels kept; what they held is replaced),
 * or onto a new day at the end when `to` is 'new'. Items are copied, not shared.
 */
export function copyDay(d: PlanDraft, from: number, to: readonly number[] | 'new'): PlanDraft {
  const source = d.days[from];
  if (!source) return d;
  const occasions = (): DraftOccasion[] =>
    source.occasions.map((o) => ({
      ...o,
      items: o.items.map((it) => ({ ...it, measure: it.measure ? { ...it.measure } : null })),
    }));
  if (to === 'new') {
    return {
      ...d,
      days: [...d.days, { label: newDay(d.days.length).label, occasions: occasions() }],
    };
  }
  const targets = new Set(to.filter((i) => i !== from));
  return {
    ...d,
    days: d.days.map((day, i) => (targets.has(i) ? { ...day, occasions: occasions() } : day)),
  };
}
