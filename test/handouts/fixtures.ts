import type { AdditiveLabelEntry, HandoutSummary } from '../../src/handouts/handout.js';

/**
 * Invented demo data: a plan summary in the shape of the `plan summary --json` contract. The
 * numbers are made up for layout and formatting tests; they are not food-table values.
 */
const n = (phosphorusMg: number, low: number, typical: number, high: number) => ({
  phosphorusMg,
  absorbablePhosphorusMg: { low, typical, high },
  additivePhosphorusMg: 0,
  proteinG: 10,
  phosphorusProteinRatioMgPerG: phosphorusMg / 10,
  potassiumMg: 100,
  sodiumMg: 100,
  calciumMg: 50,
  energyKcal: 200,
});

export function demoSummary(days = 3, itemsPerOccasion = 2, occasionsPerDay = 3): HandoutSummary {
  const names = ['Breakfast', 'Lunch', 'Dinner', 'Afternoon snack', 'Evening snack'];
  const times = ['07:30', '12:30', '19:00', '16:00', '21:00'];
  const foods = [
    { label: 'Porridge made with water', measure: { count: 1, description: 'cup' }, grams: 234 },
    { label: 'Apple', measure: { count: 1, description: 'medium (3" dia)' }, grams: 182 },
    { label: 'Rice, boiled', measure: { count: 0.5, description: 'cup' }, grams: 79 },
    { label: 'Chicken breast, roasted', measure: null, grams: 85 },
    { label: 'White bread', measure: { count: 2, description: 'slice' }, grams: 50 },
    { label: 'Processed cheese slice', measure: { count: 1, description: 'slice' }, grams: 21 },
  ];
  const summary: HandoutSummary = {
    planId: 7,
    patientId: 3,
    days: [],
    binders: {
      prescription: {
        ingredient: 'calcium-acetate',
        unitStrengthMg: 667,
        schedule: 'per-day',
        units: 6,
      },
      perOccasion: [],
      elementalCalciumMgPerDay: 1014,
    },
  };
  for (let d = 0; d < days; d++) {
    const occasions = [];
    let dayP = 0;
    let dl = 0;
    let dt = 0;
    let dh = 0;
    for (let o = 0; o < occasionsPerDay; o++) {
      const items = [];
      let p = 0;
      // Invented demo numbers: 60-120 mg phosphorus per item, absorbable 40/60/80 % of it.
      for (let i = 0; i < itemsPerOccasion; i++) {
        const f = foods[(d + o * 2 + i) % foods.length]!;
        const itemP = 60 + 10 * ((d + o + i) % 7);
        p += itemP;
        items.push({
          foodId: 100 + ((d + o * 2 + i) % foods.length),
          grams: f.grams,
          label: f.label,
          measure: f.measure,
          flags: { additive: f.label.startsWith('Processed') },
        });
      }
      const low = Math.round(p * 0.4);
      const typical = Math.round(p * 0.6);
      const high = Math.round(p * 0.8);
      dayP += p;
      dl += low;
      dt += typical;
      dh += high;
      occasions.push({
        name: names[o]!,
        time: times[o]!,
        items,
        nutrients: n(p, low, typical, high),
      });
      summary.binders!.perOccasion.push({
        day: d === 1 ? 'Dialysis day' : `Day ${d + 1}`,
        occasion: names[o]!,
        units: o < 3 ? 2 : 0,
      });
    }
    summary.days.push({
      label: d === 1 ? 'Dialysis day' : `Day ${d + 1}`,
      occasions,
      nutrients: n(dayP, dl, dt, dh),
      targets: { phosphorusMg: { max: 1000, source: 'KDOQI 2003 (invented demo choice)' } },
    });
  }
  return summary;
}

/** Invented demo data: two additive catalogue entries in the catalogue's shape. */
export const demoAdditives: AdditiveLabelEntry[] = [
  {
    eNumber: 'E 339',
    insNumber: '339',
    counted: true,
    labelNames: {
      en: ['sodium phosphates'],
      es: ['fosfatos de sodio'],
      fr: ['phosphates de sodium'],
    },
  },
  {
    eNumber: 'E 338',
    insNumber: '338',
    counted: true,
    labelNames: { en: ['phosphoric acid'], es: ['ácido fosfórico'], fr: ['acide phosphorique'] },
  },
  { eNumber: 'E 322', insNumber: '322', counted: false, labelNames: { en: ['lecithins'] } },
];

export const demoClinic = {
  name: 'Riverside Kidney Clinic (demo)',
  contact: '555-0142',
  dietitianName: 'A. Demo, RD',
};
export const demoPatient = { label: 'Demo patient R-12', language: 'es' };

/**
 * Invented demo data: one day shaped like the demo plan's first day (breakfast 4 items, lunch 4,
 * a snack of 1, dinner 5), for the "one-day plan on two pages" check.
 */
export function oneDaySummary(): HandoutSummary {
  const summary = demoSummary(1, 5, 4);
  const counts = [4, 4, 1, 5];
  const day = summary.days[0]!;
  day.occasions = day.occasions.map((o, i) => ({ ...o, items: o.items.slice(0, counts[i]) }));
  day.label = 'Day 1';
  return summary;
}
