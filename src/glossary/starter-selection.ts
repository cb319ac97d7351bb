/** One food of the starter glossary: its table format and code. */
export interface StarterFood {
  foodSource: string;
  foodCode: string;
}

/**
 * The rule that chose the starter glossary's foods (so the list can be rebuilt): every food of
 * the demo plan (IFCT 2017 codes), then the USDA SR28 foods that the invented labelled diary
 * lines name (test/fixtures/diary/labelled-lines.tsv, everyday eating as a dietitian labels
 * it), most often named first, ties by NDB number, until `max` foods. Pure.
 */
export function selectStarterFoods(
  demoCodes: readonly string[],
  labelledNdbs: readonly string[],
  max = 200,
): StarterFood[] {
  const out: StarterFood[] = [...new Set(demoCodes)].map((c) => ({
    foodSource: 'ifct2017',
    foodCode: c,
  }));
  const counts = new Map<string, number>();
  for (const ndb of labelledNdbs) counts.set(ndb, (counts.get(ndb) ?? 0) + 1);
  const ranked = [...counts].sort((a, b) => b[1] - a[1] || Number(a[0]) - Number(b[0]));
  for (const [ndb] of ranked) {
    if (out.length >= max) break;
    out.push({ foodSource: 'usda-sr28', foodCode: ndb });
  }
  return out.slice(0, max);
}
