import { formatDate, formatList, formatNumber, formatTime } from '../i18n/format.js';
import type { MessageBundle, MessageValues } from '../i18n/messages.js';
import type { ReviewStatus } from '../i18n/catalogue.js';
import { patientFacingName, type FoodNameSources } from '../glossary/glossary.js';
import type { DrinkVolume } from './drinks.js';
import type { ScriptFamily } from './pdf/fonts.js';
import { BINDER_CATALOGUE, type BinderInfo } from '../binders/catalogue.js';
import type {
  AdditiveLabelEntry,
  HandoutClinic,
  HandoutDay,
  HandoutItem,
  HandoutPatient,
  HandoutSummary,
} from './handout.js';

export interface MgRange {
  low: number;
  typical: number;
  high: number;
}

export interface ChartRowVm {
  label: string;
  /** Absorbable phosphorus of the occasion, mg (typical, low, high), straight from the summary. */
  absorbableMg: MgRange;
  valueText: string;
}

export interface ChartVm {
  title: string;
  rows: ChartRowVm[];
  whole: {
    label: string;
    absorbableMg: MgRange;
    totalMg: number;
    valueText: string;
  };
  /** The day's phosphorus target in mg (total phosphorus), when the plan has one. */
  target: { mg: number; text: string } | null;
  legend: { absorbed: string; inFood: string; range: string };
}

export interface ItemVm {
  label: string;
  portion: string;
  grams: number;
  /** How to cook it, in a few words in the patient's language; only when a method was chosen. */
  preparation?: string;
}

/** The "how to cook" section: present only when some item has a preparation method. */
export interface CookingVm {
  heading: string;
  intro: string;
  /** One line per food and method ("Potatoes: boiled, water thrown away"). */
  items: string[];
  /** One plain instruction per method used. */
  steps: { method: string; label: string; how: string }[];
  water: string;
  caution: string;
}

export interface OccasionVm {
  name: string;
  timeText: string | null;
  absorbableMg: MgRange;
  absorbedLine: string;
  items: ItemVm[];
  /** line: the dose and its timing as one sentence pair in the language's punctuation. */
  binder: { units: number; dose: string; timing: string[]; line: string } | null;
}

export interface DayVm {
  number: number;
  heading: string;
  /** Heading repeated on a page the day runs on to. */
  continuedHeading: string;
  /** The dietitian's own name for the day when it is more than "Day n". */
  label: string | null;
  totalMg: number;
  absorbableMg: MgRange;
  totalLine: string;
  occasions: OccasionVm[];
  chart: ChartVm;
  /** What the marks after food names mean (drafted names, the table's own names), when used. */
  nameNotes: string[];
}

/** Everything a handout shows, already in the patient's language; both renderers read only this. */
export interface HandoutViewModel {
  language: string;
  languageName: string;
  locale: string;
  direction: 'ltr' | 'rtl';
  script: ScriptFamily;
  review: { status: ReviewStatus; notice: string | null };
  strings: {
    title: string;
    subtitle: string;
    howToRead: string;
    forLabel: string;
    dateLabel: string;
    dietitianLabel: string;
    clinicLabel: string;
    contactLabel: string;
  };
  /** "Page {page} of {pages}" in the language; renderers fill it in once pages are known. */
  pageLabel: { pattern: string; locale: string };
  header: {
    clinicName: string;
    clinicContact: string;
    patientLabel: string;
    dietitianName: string;
    date: string;
    dateText: string;
  };
  days: DayVm[];
  binder: { heading: string; name: string | null; lines: string[] };
  foodsToWatch: {
    heading: string;
    intro: string;
    codes: { code: string; names: string[] }[];
    plainWords: string;
    foods: string;
    inPlan: string | null;
  };
  cautions: { heading: string; lines: string[] };
  /** Only when some item has a preparation method. */
  cooking?: CookingVm;
  /** Keys shown in English because the language lacks them (only in 'mark' mode). */
  fallbackKeys: string[];
}

/** What the handout knows of one food beyond the summary (the glossary and the food table). */
export interface HandoutFoodInfo {
  names: FoodNameSources;
  /** Density for giving a drink in ml; null when the food is not drunk. */
  drink: DrinkVolume | null;
}

/** Mark after a name nobody has checked in the language yet. */
export const DRAFTED_MARK = ' *';
/** Mark after the table's own name standing in for a name in the language. */
export const TABLE_NAME_MARK = ' \u2020';

const STRONG_LTR = /[A-Za-z\u00c0-\u024f\u0370-\u03ff\u0400-\u04ff]/;
/**
 * Unicode bidi isolation (FSI ... PDI, UAX #9 X5c) around text that holds left-to-right letters
 * inside a right-to-left handout, so its punctuation stays with it (Latin food names in Arabic).
 */
export function isolateInRtl(text: string, direction: 'ltr' | 'rtl'): string {
  return direction === 'rtl' && STRONG_LTR.test(text) ? `\u2068${text}\u2069` : text;
}

export interface HandoutOptions {
  /** Patient-facing names and drink densities per food id. */
  foods?: ReadonlyMap<number, HandoutFoodInfo>;
  /** Phosphate additives for "foods to watch" (the additive catalogue's entries). */
  additives?: readonly AdditiveLabelEntry[];
  /**
   * 'refuse' (handouts): a language missing any string gives an error listing the keys.
   * 'mark' (the clinic's preview): English stands in, prefixed with a visible [EN] marker.
   */
  fallback?: 'refuse' | 'mark';
}

export type HandoutBuild =
  | { ok: true; value: HandoutViewModel }
  | { ok: false; code: 'LANGUAGE_INCOMPLETE'; language: string; missingKeys: string[] };

/** Marker put in front of English text standing in for a missing string (clinic preview only). */
export const FALLBACK_MARK = '[EN] ';

const OCCASION_KEYS: Record<string, string> = {
  breakfast: 'occasion.breakfast',
  lunch: 'occasion.lunch',
  dinner: 'occasion.dinner',
  supper: 'occasion.dinner',
  snack: 'occasion.snack',
  'morning snack': 'occasion.morningSnack',
  'afternoon snack': 'occasion.afternoonSnack',
  'evening snack': 'occasion.eveningSnack',
  'bedtime snack': 'occasion.eveningSnack',
};

/** Container words a drink is measured in (SR28 "can or bottle (12 fl oz)", "cup (8 fl oz)"). */
const DRINK_MEASURES: [RegExp, string][] = [
  [/^(cans?|can or bottle)\b/i, 'measure.can'],
  [/^bottles?\b/i, 'measure.bottle'],
  [/^(cups?|glass(es)?|fl oz)\b/i, 'measure.glass'],
];

const MEASURES: [RegExp, string][] = [
  [/^cups?\b/i, 'measure.cup'],
  [/^(tbsp|tablespoons?)\b/i, 'measure.tablespoon'],
  [/^(tsp|teaspoons?)\b/i, 'measure.teaspoon'],
  [/^slices?\b/i, 'measure.slice'],
  [/^(pieces?|pc|pcs)\b/i, 'measure.piece'],
  [/^small\b/i, 'measure.small'],
  [/^medium\b/i, 'measure.medium'],
  [/^large\b/i, 'measure.large'],
];

/** The handout sentence for each way of taking a binder (the way itself is in the binder catalogue). */
const INTAKE_KEYS: Record<BinderInfo['intake'], string> = {
  swallow: 'binder.timing.swallow',
  chew: 'binder.timing.chew',
  'as-label': 'binder.timing.asLabel',
};

/** A label used as a heading starts with a capital where the script has them. */
function firstUpper(text: string): string {
  return text.charAt(0).toLocaleUpperCase() + text.slice(1);
}

/** The method an item is cooked by, or null when it is as the table lists it. */
function preparedMethod(item: HandoutItem): string | null {
  const m = item.preparation?.method;
  return m && m !== 'as-listed' ? m : null;
}

/** "How to cook": each prepared food once, each method's instruction once, water and caution. */
function cookingSection(
  summary: HandoutSummary,
  t: (key: string, values?: MessageValues) => string,
): CookingVm | null {
  const lines = new Map<string, string>();
  const methods: string[] = [];
  for (const d of summary.days)
    for (const o of d.occasions)
      for (const i of o.items) {
        const m = preparedMethod(i);
        if (!m) continue;
        if (!methods.includes(m)) methods.push(m);
        const key = `${i.label}\u0000${m}`;
        if (!lines.has(key))
          lines.set(key, t('prep.item', { food: i.label, method: t(`prep.method.${m}`) }));
      }
  if (methods.length === 0) return null;
  return {
    heading: t('prep.heading'),
    intro: t('prep.intro'),
    items: [...lines.values()],
    steps: methods.map((m) => ({
      method: m,
      label: firstUpper(t(`prep.method.${m}`)),
      how: t(`prep.how.${m}`),
    })),
    water: t('prep.water'),
    caution: t('prep.caution'),
  };
}

/** How a binder is taken, from the binder catalogue only; an unknown ingredient reads the label. */
export function binderIntakeKey(ingredient: string): string {
  const info = (BINDER_CATALOGUE as Record<string, BinderInfo | undefined>)[ingredient];
  return INTAKE_KEYS[info?.intake ?? 'as-label'];
}

/**
 * Units a day the handout states: the prescription itself for a per-day schedule; for a
 * per-meal one, the units with each meal x the meals of the day, as the summary's schedule
 * counted them, when every day has the same number (else null: the per-meal line stands alone).
 */
function statedUnitsPerDay(binders: NonNullable<HandoutSummary['binders']>): number | null {
  const rx = binders.prescription;
  if (!rx) return null;
  if (rx.schedule !== 'per-meal') return rx.units;
  const perDay = new Set((binders.days ?? []).map((d) => d.prescribedUnits ?? null));
  if (perDay.size !== 1) return null;
  const [only] = [...perDay];
  return only ?? null;
}

/** Reads the day's phosphorus target (mg/day) from the summary's targets, whatever its shape. */
export function phosphorusTargetMg(targets: unknown): number | null {
  if (!targets || typeof targets !== 'object') return null;
  const t =
    (targets as Record<string, unknown>).phosphorusMg ??
    (targets as Record<string, unknown>).phosphorus;
  if (typeof t === 'number' && Number.isFinite(t)) return t;
  if (t && typeof t === 'object') {
    const o = t as Record<string, unknown>;
    for (const k of ['max', 'upper', 'value', 'target', 'high']) {
      const v = o[k];
      if (typeof v === 'number' && Number.isFinite(v)) return v;
    }
  }
  return null;
}

/** Whether a binder dose row belongs to the day at index dayIndex (0-based). */
function sameDay(rowDay: number | string, dayIndex: number, day: HandoutDay) {
  if (typeof rowDay === 'string') return rowDay === day.label;
  return rowDay === dayIndex + 1;
}

/**
 * Builds the handout's view-model from a plan summary, the patient, the clinic settings, the
 * language's messages and the date the handout carries (YYYY-MM-DD). Pure: no clock, no I/O.
 * All amounts stay in mg and g as the summary gives them; texts round to whole mg.
 */
export function buildHandoutViewModel(
  summary: HandoutSummary,
  patient: HandoutPatient,
  clinic: HandoutClinic,
  language: string,
  messages: MessageBundle,
  dateIso: string,
  options: HandoutOptions = {},
): HandoutBuild {
  if (messages.language !== language) {
    throw new Error(`messages are ${messages.language}, handout asked for ${language}`);
  }
  const mode = options.fallback ?? 'refuse';
  const missing = messages.missingKeys();
  if (mode === 'refuse' && missing.length > 0) {
    return { ok: false, code: 'LANGUAGE_INCOMPLETE', language, missingKeys: missing };
  }
  const meta = messages.catalogue.meta;
  const locale = meta.locale;
  const fallbackKeys = new Set<string>();
  const t = (key: string, values: MessageValues = {}): string => {
    const r = messages.format(key, values);
    if (!r.fallback) return r.text;
    fallbackKeys.add(key);
    return FALLBACK_MARK + r.text;
  };
  const mg = (n: number) => formatNumber(locale, Math.round(n));
  const grams = (n: number) => formatNumber(locale, n, n < 10 ? 1 : 0);

  const ingredient = summary.binders?.prescription?.ingredient ?? null;
  const binderName = ingredient ? t(`binder.name.${ingredient}`) : null;
  const doses = summary.binders?.perOccasion ?? [];

  const occasionName = (name: string) => {
    const key = OCCASION_KEYS[name.trim().toLowerCase()];
    return key ? t(key) : name;
  };

  const dir = meta.direction;
  const portion = (item: HandoutItem): string => {
    const g = grams(item.grams);
    const m = item.measure;
    const drink = options.foods?.get(item.foodId)?.drink ?? null;
    if (drink) {
      // Drinks in ml, the unit on their containers; rounded to 5 ml above 50 ml.
      const mlExact = item.grams / drink.gPerMl;
      const ml = formatNumber(
        locale,
        mlExact >= 50 ? Math.round(mlExact / 5) * 5 : Math.round(mlExact),
      );
      const hit =
        m && m.count > 0 ? DRINK_MEASURES.find(([re]) => re.test(m.description.trim())) : null;
      if (m && hit) return t('portion.withMl', { measure: t(hit[1], { count: m.count }), ml });
      return t('portion.ml', { ml });
    }
    if (m && m.count > 0) {
      const hit = MEASURES.find(([re]) => re.test(m.description.trim()));
      if (hit) return t('portion.withGrams', { measure: t(hit[1], { count: m.count }), grams: g });
    }
    return t('portion.grams', { grams: g });
  };

  // A prepared item is weighed on the plate: the grams the patient sees once it is cooked.
  const preparedPortion = (item: HandoutItem): string | null => {
    const plate = item.preparation?.plateGrams;
    return preparedMethod(item) && plate !== undefined
      ? t('prep.portionCooked', { grams: grams(plate) })
      : null;
  };

  const itemLabel = (item: HandoutItem, used: Set<string>): string => {
    const info = options.foods?.get(item.foodId);
    // Without the table's name the label cannot be told from it: it is printed as given.
    if (!info && item.foodName === undefined) return isolateInRtl(item.label, dir);
    const sources: FoodNameSources = info?.names ?? { foodName: item.foodName ?? item.label };
    const name = patientFacingName(item.label, sources, language);
    const mark = name.drafted ? DRAFTED_MARK : name.fromTable ? TABLE_NAME_MARK : '';
    if (mark) used.add(mark);
    return isolateInRtl(name.text, dir) + mark;
  };

  const days: DayVm[] = summary.days.map((day, dayIndex) => {
    const marks = new Set<string>();
    const occasions: OccasionVm[] = day.occasions.map((occ) => {
      const dose = doses.find((d) => sameDay(d.day, dayIndex, day) && d.occasion === occ.name);
      let binder: OccasionVm['binder'] = null;
      if (ingredient && binderName) {
        const units = dose?.units ?? 0;
        binder =
          units > 0
            ? (() => {
                const dose = t('binder.dose', { count: units, binder: binderName });
                // How to take it (chew or swallow) is said once, in the binder section.
                const timing = t('binder.timing.withMeal');
                return { units, dose, timing: [timing], line: t('binder.line', { dose, timing }) };
              })()
            : // Never "not needed": none is prescribed here, and the care team decides.
              { units: 0, dose: t('binder.none'), timing: [], line: t('binder.none') };
      }
      const a = occ.nutrients.absorbablePhosphorusMg;
      return {
        name: occasionName(occ.name),
        timeText: occ.time ? t('occasion.at', { time: formatTime(locale, occ.time) }) : null,
        absorbableMg: { low: a.low, typical: a.typical, high: a.high },
        absorbedLine: t('occasion.absorbed', { typical: mg(a.typical) }),
        items: occ.items.map((item) => ({
          label: itemLabel(item, marks),
          portion: preparedPortion(item) ?? portion(item),
          grams: item.grams,
          ...(preparedMethod(item)
            ? { preparation: t(`prep.method.${preparedMethod(item) as string}`) }
            : {}),
        })),
        binder,
      };
    });
    const a = day.nutrients.absorbablePhosphorusMg;
    const targetMg = phosphorusTargetMg(day.targets);
    const heading = t('day.heading', { day: formatNumber(locale, dayIndex + 1) });
    const fullHeading =
      /^\s*day\s*\d+\s*$/i.test(day.label) || !day.label.trim()
        ? heading
        : `${heading}: ${day.label}`;
    return {
      number: dayIndex + 1,
      heading,
      continuedHeading: t('day.continued', { heading: fullHeading }),
      label: /^\s*day\s*\d+\s*$/i.test(day.label) || !day.label.trim() ? null : day.label,
      totalMg: day.nutrients.phosphorusMg,
      absorbableMg: { low: a.low, typical: a.typical, high: a.high },
      totalLine: t('day.total', {
        typical: mg(a.typical),
        low: mg(a.low),
        high: mg(a.high),
        total: mg(day.nutrients.phosphorusMg),
      }),
      occasions,
      nameNotes: [
        ...(marks.has(DRAFTED_MARK) ? [t('names.drafted')] : []),
        ...(marks.has(TABLE_NAME_MARK) ? [t('names.fromTable')] : []),
      ],
      chart: {
        title: t('chart.title'),
        rows: occasions.map((o) => ({
          label: o.name,
          absorbableMg: o.absorbableMg,
          valueText: t('chart.value', { value: mg(o.absorbableMg.typical) }),
        })),
        whole: {
          label: t('chart.wholeDay'),
          absorbableMg: { low: a.low, typical: a.typical, high: a.high },
          totalMg: day.nutrients.phosphorusMg,
          valueText: t('chart.wholeValue', {
            absorbed: mg(a.typical),
            total: mg(day.nutrients.phosphorusMg),
          }),
        },
        target:
          targetMg === null
            ? null
            : { mg: targetMg, text: t('chart.target', { target: mg(targetMg) }) },
        legend: {
          absorbed: t('chart.absorbed'),
          inFood: t('chart.inFood'),
          range: t('chart.range'),
        },
      },
    };
  });

  const binderLines: string[] = [];
  const prescription = summary.binders?.prescription ?? null;
  if (prescription && binderName && summary.binders) {
    if (prescription.schedule === 'per-meal')
      binderLines.push(t('binder.perMeal', { count: prescription.units }));
    const perDay = statedUnitsPerDay(summary.binders);
    if (perDay !== null && perDay > 0) binderLines.push(t('binder.perDay', { count: perDay }));
    binderLines.push(t('binder.timing.withMeal'));
    binderLines.push(t(binderIntakeKey(prescription.ingredient)));
  } else {
    binderLines.push(t('binder.noPrescription'));
  }

  const labelLanguage = meta.additiveLabelLanguage;
  const codes = (options.additives ?? [])
    .filter((a): a is AdditiveLabelEntry & { eNumber: string } => a.counted && !!a.eNumber)
    .map((a) => ({
      code: a.eNumber.replace(/^E\s*/i, 'E\u00a0'),
      names: labelLanguage ? [...(a.labelNames[labelLanguage] ?? [])].slice(0, 2) : [],
    }))
    .sort((x, y) => x.code.localeCompare(y.code, 'en', { numeric: true }));
  const flagged = [
    ...new Set(
      summary.days.flatMap((d) =>
        d.occasions.flatMap((o) =>
          o.items.filter((i) => i.flags?.additive).map((i) => itemLabel(i, new Set())),
        ),
      ),
    ),
  ];

  const cautionCodes = new Set((summary.cautions ?? []).map((c) => c.code));
  const value: HandoutViewModel = {
    language,
    languageName: meta.name,
    locale,
    direction: meta.direction,
    script: meta.script,
    review: {
      status: meta.review.status,
      notice:
        language === 'en'
          ? null
          : t(meta.review.status === 'reviewed' ? 'footer.reviewed' : 'footer.drafted'),
    },
    strings: {
      title: t('handout.title'),
      subtitle: t('handout.subtitle'),
      howToRead: t('handout.howToRead'),
      forLabel: t('handout.for'),
      dateLabel: t('handout.date'),
      dietitianLabel: t('handout.dietitian'),
      clinicLabel: t('handout.clinic'),
      contactLabel: t('handout.contact'),
    },
    pageLabel: {
      pattern:
        messages.catalogue.patterns.get('footer.page') ??
        (messages.english.patterns.get('footer.page') as string),
      locale,
    },
    header: {
      clinicName: isolateInRtl(clinic.name.trim() || '\u2014', dir),
      clinicContact: isolateInRtl(clinic.contact.trim() || '\u2014', dir),
      patientLabel: isolateInRtl(patient.label, dir),
      dietitianName: isolateInRtl(clinic.dietitianName.trim() || '\u2014', dir),
      date: dateIso,
      dateText: formatDate(locale, dateIso),
    },
    days,
    binder: { heading: t('binder.heading'), name: binderName, lines: binderLines },
    foodsToWatch: {
      heading: t('watch.heading'),
      intro: t('watch.intro'),
      codes,
      plainWords: t('watch.plainWords'),
      foods: t('watch.foods'),
      inPlan: flagged.length ? t('watch.inPlan', { foods: formatList(locale, flagged) }) : null,
    },
    cautions: {
      heading: t('caution.heading'),
      lines: [
        t('caution.prepared'),
        t('caution.medicines'),
        t('caution.symptoms'),
        t('caution.estimates'),
        // Additive phosphorus varies by brand (Sherman and Mehta 2009): said on every handout.
        t('caution.additives'),
        ...(cautionCodes.has('potassium-dialysis') ? [t('caution.potassium')] : []),
        ...(cautionCodes.has('protein-below-target') ? [t('caution.protein')] : []),
        ...(clinic.contact.trim()
          ? [t('caution.questions', { contact: isolateInRtl(clinic.contact, dir) })]
          : []),
      ],
    },
    fallbackKeys: [],
  };
  const cooking = cookingSection(summary, t);
  if (cooking) value.cooking = cooking;
  if (!messages.catalogue.patterns.has('footer.page')) fallbackKeys.add('footer.page');
  value.fallbackKeys = [...fallbackKeys].sort();
  return { ok: true, value };
}
