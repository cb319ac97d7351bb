/**
 * Phosphorus-containing food additives and fortificants.
 *
 * Numbers and names: EU Union list, Regulation (EC) No 1333/2008 Annex II (as amended; E 450(ix)
 * added by Commission Regulation (EU) No 298/2014), specifications Commission Regulation (EU)
 * No 231/2012; Codex Class Names and International Numbering System for Food Additives,
 * CAC/GL 36-1989 (as revised). The group E 338-341, E 343, E 450-452 is the one re-evaluated by
 * EFSA FAF Panel 2019 (EFSA J 2019;17(6):5674). Sub-number lists and the Codex-only entries
 * (INS 342, 343(iii), 450(iv), 450(viii), 452(v), 541(ii)) are from memory of those lists.
 * Label names in the six languages are from memory of the language versions of Annex II and of
 * common label wording; the authoritative wording is the regulation's language version.
 *
 * P mass fractions are computed here from each formula with IUPAC 2021 abridged atomic weights
 * (src/chem); none is typed in by hand.
 */
import { phosphorusMassFraction } from '../chem/formula.js';

export const LABEL_LANGUAGES = ['en', 'es', 'fr', 'de', 'it', 'pt'] as const;
export type LabelLanguage = (typeof LABEL_LANGUAGES)[number];

export type AdditiveKind =
  | 'inorganic-phosphate'
  | 'aluminium-phosphate'
  | 'organic-phosphate'
  | 'starch-phosphate'
  | 'phospholipid'
  | 'fortificant'
  | 'unspecified-phosphate';

export interface AdditiveEntry {
  /** Display code: "E 339(ii)", "INS 342(i)" when Codex only, or the chemical name for fortificants. */
  code: string;
  /** EU number with sub-number, e.g. "E 339(ii)"; null when not on the EU list. */
  eNumber: string | null;
  /** Codex INS number with sub-number, e.g. "339(ii)"; null when not in the INS. */
  insNumber: string | null;
  /** Main number as a string ("339"), or "fortificant" / "phosphate" for the un-numbered ones. */
  family: string;
  /** Roman sub-number without brackets ("ii"), null for a whole family or an un-numbered entry. */
  subNumber: string | null;
  /** 'family' entries stand for "E 339" without sub-number or "sodium phosphates". */
  level: 'substance' | 'family';
  chemicalName: string;
  /** Formula the P fraction is computed from (anhydrous unless `formulaBasis` says otherwise). */
  formula: string | null;
  formulaBasis: string;
  /** P mass fraction 0-1 computed from `formula`; null when the substance has no fixed formula. */
  pMassFraction: number | null;
  /** For families and mixtures: lowest and highest fraction of the members, computed. */
  pMassFractionRange: { min: number; max: number } | null;
  /** Hydrates sold under the same number, with their P fraction computed from the formula. */
  hydrates: { formula: string; pMassFraction: number }[];
  functions: string[];
  kind: AdditiveKind;
  /** Counted as additive (inorganic, well absorbed) phosphorus in renal practice. */
  counted: boolean;
  countedReason: string;
  euAuthorised: boolean;
  codexListed: boolean;
  labelNames: Record<LabelLanguage, string[]>;
  /** Letter abbreviations seen on labels (SAPP, STPP); matched as whole words only. */
  abbreviations: string[];
  notes: string;
}

/** Bumped whenever entries, names or matching rules change; stored beside each food's scan. */
export const ADDITIVE_CATALOGUE_VERSION = '2026-12-06.1';

const COUNTED_INORGANIC =
  'inorganic phosphate: counted as additive phosphorus, absorbed almost completely ' +
  '(EFSA 2019: 80-90% as free orthophosphate; counting rule: common renal practice, no source)';
const COUNTED_ALUMINIUM =
  'inorganic phosphate (aluminium salt): counted as additive phosphorus (common renal practice, no source)';
const NOT_COUNTED_ORGANIC =
  'organic phosphate ester used at mg/kg levels: noted, not counted (common renal practice, no source)';
const NOT_COUNTED_STARCH =
  'starch phosphate: phosphate bound to starch, residual P limited by Reg. (EU) 231/2012 to well ' +
  'under 1%: noted, not counted (common renal practice, no source)';
const NOT_COUNTED_LECITHIN =
  'phospholipid emulsifier (a few % P, used in small amounts): noted, not counted (common renal practice, no source)';
const COUNTED_FORTIFICANT =
  'phosphate mineral fortificant: counted as additive phosphorus; how much of its P is absorbed is ' +
  'not established (poorly soluble iron phosphates may be absorbed less) (common practice, no source)';

type Names = Record<LabelLanguage, string | string[]>;

function names(n: Names): Record<LabelLanguage, string[]> {
  const out = {} as Record<LabelLanguage, string[]>;
  for (const lang of LABEL_LANGUAGES) {
    const v = n[lang];
    out[lang] = Array.isArray(v) ? v : [v];
  }
  return out;
}

interface Spec {
  e?: string | null; // "339(ii)" -> eNumber "E 339(ii)"
  ins?: string | null;
  family: string;
  sub?: string | null;
  chemicalName: string;
  formula?: string | null;
  formulaBasis?: string;
  functions: string[];
  kind: AdditiveKind;
  counted: boolean;
  countedReason: string;
  labelNames: Names;
  abbreviations?: string[];
  notes?: string;
  code?: string;
  /** Hydrate formulas, e.g. 'Na2HPO4·12H2O' (middle dot). */
  hydrates?: string[];
}

function entry(s: Spec): AdditiveEntry {
  const eNumber = s.e ? `E ${s.e}` : null;
  const insNumber = s.ins ?? null;
  const formula = s.formula ?? null;
  return {
    code: s.code ?? eNumber ?? (insNumber ? `INS ${insNumber}` : s.chemicalName),
    eNumber,
    insNumber,
    family: s.family,
    subNumber: s.sub ?? null,
    level: 'substance',
    chemicalName: s.chemicalName,
    formula,
    formulaBasis: s.formulaBasis ?? 'anhydrous',
    pMassFraction: formula ? phosphorusMassFraction(formula) : null,
    pMassFractionRange: null,
    hydrates: (s.hydrates ?? []).map((h) => ({
      formula: h,
      pMassFraction: phosphorusMassFraction(h),
    })),
    functions: s.functions,
    kind: s.kind,
    counted: s.counted,
    countedReason: s.countedReason,
    euAuthorised: eNumber !== null,
    codexListed: insNumber !== null,
    labelNames: names(s.labelNames),
    abbreviations: s.abbreviations ?? [],
    notes: s.notes ?? '',
  };
}

const S = 'inorganic-phosphate' as const;

/** Every substance entry (one per sub-number, plus un-numbered fortificants). */
const SUBSTANCES: AdditiveEntry[] = [
  entry({
    e: '338',
    ins: '338',
    family: '338',
    chemicalName: 'Phosphoric acid',
    formula: 'H3PO4',
    functions: ['acidulant (cola drinks)', 'acidity regulator', 'sequestrant'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['phosphoric acid', 'orthophosphoric acid'],
      es: 'ácido fosfórico',
      fr: ['acide phosphorique', 'acide orthophosphorique'],
      de: ['Phosphorsäure', 'Orthophosphorsäure'],
      it: 'acido fosforico',
      pt: 'ácido fosfórico',
    },
    notes:
      'Food-grade acid is sold as a 75-85% solution (from memory); fraction is for pure H3PO4.',
  }),
  entry({
    e: '339(i)',
    ins: '339(i)',
    family: '339',
    sub: 'i',
    chemicalName: 'Monosodium phosphate (sodium dihydrogen phosphate)',
    formula: 'NaH2PO4',
    hydrates: ['NaH2PO4·H2O', 'NaH2PO4·2H2O'],
    functions: ['acidity regulator', 'emulsifying salt', 'moisture retention'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['monosodium phosphate', 'sodium dihydrogen phosphate'],
      es: ['fosfato monosódico', 'dihidrogenofosfato de sodio'],
      fr: ['phosphate monosodique', 'dihydrogénophosphate de sodium'],
      de: ['Mononatriumphosphat', 'Natriumdihydrogenphosphat'],
      it: ['fosfato monosodico', 'diidrogenofosfato di sodio'],
      pt: ['fosfato monossódico', 'di-hidrogenofosfato de sódio'],
    },
    notes: 'Also sold as mono- and dihydrate (NaH2PO4·2H2O).',
  }),
  entry({
    e: '339(ii)',
    ins: '339(ii)',
    family: '339',
    sub: 'ii',
    chemicalName: 'Disodium phosphate (disodium hydrogen phosphate)',
    formula: 'Na2HPO4',
    hydrates: ['Na2HPO4·2H2O', 'Na2HPO4·7H2O', 'Na2HPO4·12H2O'],
    functions: ['emulsifying salt (processed cheese)', 'acidity regulator', 'stabiliser'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,

    labelNames: {
      en: ['disodium phosphate', 'disodium hydrogen phosphate'],
      es: ['fosfato disódico', 'hidrogenofosfato de disodio'],
      fr: ['phosphate disodique', 'hydrogénophosphate de disodium'],
      de: ['Dinatriumphosphat', 'Dinatriumhydrogenphosphat'],
      it: ['fosfato disodico', 'idrogenofosfato di disodio'],
      pt: ['fosfato dissódico', 'hidrogenofosfato de dissódio'],
    },
    notes: 'Hydrates (·2H2O, ·7H2O, ·12H2O) carry less P per gram.',
  }),
  entry({
    e: '339(iii)',
    ins: '339(iii)',
    family: '339',
    sub: 'iii',
    chemicalName: 'Trisodium phosphate',
    formula: 'Na3PO4',
    hydrates: ['Na3PO4·12H2O'],
    functions: ['acidity regulator', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,

    labelNames: {
      en: 'trisodium phosphate',
      es: 'fosfato trisódico',
      fr: 'phosphate trisodique',
      de: 'Trinatriumphosphat',
      it: 'fosfato trisodico',
      pt: 'fosfato trissódico',
    },
  }),
  entry({
    e: '340(i)',
    ins: '340(i)',
    family: '340',
    sub: 'i',
    chemicalName: 'Monopotassium phosphate (potassium dihydrogen phosphate)',
    formula: 'KH2PO4',
    functions: ['acidity regulator', 'moisture retention'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['monopotassium phosphate', 'potassium dihydrogen phosphate'],
      es: 'fosfato monopotásico',
      fr: 'phosphate monopotassique',
      de: ['Monokaliumphosphat', 'Kaliumdihydrogenphosphat'],
      it: 'fosfato monopotassico',
      pt: 'fosfato monopotássico',
    },
    notes: 'Also adds potassium.',
  }),
  entry({
    e: '340(ii)',
    ins: '340(ii)',
    family: '340',
    sub: 'ii',
    chemicalName: 'Dipotassium phosphate (dipotassium hydrogen phosphate)',
    formula: 'K2HPO4',
    functions: ['acidity regulator', 'stabiliser (creamers)', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['dipotassium phosphate', 'dipotassium hydrogen phosphate'],
      es: 'fosfato dipotásico',
      fr: 'phosphate dipotassique',
      de: ['Dikaliumphosphat', 'Dikaliumhydrogenphosphat'],
      it: 'fosfato dipotassico',
      pt: 'fosfato dipotássico',
    },
    notes: 'Also adds potassium.',
  }),
  entry({
    e: '340(iii)',
    ins: '340(iii)',
    family: '340',
    sub: 'iii',
    chemicalName: 'Tripotassium phosphate',
    formula: 'K3PO4',
    functions: ['acidity regulator', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'tripotassium phosphate',
      es: 'fosfato tripotásico',
      fr: 'phosphate tripotassique',
      de: 'Trikaliumphosphat',
      it: 'fosfato tripotassico',
      pt: 'fosfato tripotássico',
    },
    notes: 'Also adds potassium.',
  }),
  entry({
    e: '341(i)',
    ins: '341(i)',
    family: '341',
    sub: 'i',
    chemicalName: 'Monocalcium phosphate (calcium dihydrogen phosphate)',
    formula: 'Ca(H2PO4)2',
    hydrates: ['Ca(H2PO4)2·H2O'],
    functions: ['leavening acid (baking powder)', 'firming agent', 'flour treatment'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,

    labelNames: {
      en: ['monocalcium phosphate', 'calcium dihydrogen phosphate'],
      es: 'fosfato monocálcico',
      fr: 'phosphate monocalcique',
      de: ['Monocalciumphosphat', 'Calciumdihydrogenphosphat'],
      it: 'fosfato monocalcico',
      pt: 'fosfato monocálcico',
    },
    notes: 'Monohydrate common.',
  }),
  entry({
    e: '341(ii)',
    ins: '341(ii)',
    family: '341',
    sub: 'ii',
    chemicalName: 'Dicalcium phosphate (calcium hydrogen phosphate)',
    formula: 'CaHPO4',
    hydrates: ['CaHPO4·2H2O'],
    functions: ['leavening', 'anti-caking agent', 'calcium fortificant'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,

    labelNames: {
      en: ['dicalcium phosphate', 'calcium hydrogen phosphate'],
      es: 'fosfato dicálcico',
      fr: 'phosphate dicalcique',
      de: ['Dicalciumphosphat', 'Calciumhydrogenphosphat'],
      it: 'fosfato dicalcico',
      pt: 'fosfato dicálcico',
    },
    notes: 'Dihydrate common.',
  }),
  entry({
    e: '341(iii)',
    ins: '341(iii)',
    family: '341',
    sub: 'iii',
    chemicalName: 'Tricalcium phosphate',
    formula: 'Ca3(PO4)2',
    functions: ['anti-caking agent', 'calcium fortificant', 'acidity regulator'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,

    labelNames: {
      en: 'tricalcium phosphate',
      es: 'fosfato tricálcico',
      fr: 'phosphate tricalcique',
      de: 'Tricalciumphosphat',
      it: 'fosfato tricalcico',
      pt: 'fosfato tricálcico',
    },
    notes: 'The commercial product is often close to hydroxyapatite Ca5(PO4)3OH (from memory).',
  }),
  entry({
    e: '343(i)',
    ins: '343(i)',
    family: '343',
    sub: 'i',
    chemicalName: 'Monomagnesium phosphate (magnesium dihydrogen phosphate)',
    formula: 'Mg(H2PO4)2',
    hydrates: ['Mg(H2PO4)2·4H2O'],
    functions: ['acidity regulator', 'anti-caking agent'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['monomagnesium phosphate', 'magnesium dihydrogen phosphate'],
      es: 'fosfato monomagnésico',
      fr: 'phosphate monomagnésique',
      de: 'Monomagnesiumphosphat',
      it: 'fosfato monomagnesiaco',
      pt: 'fosfato monomagnésico',
    },
  }),
  entry({
    e: '343(ii)',
    ins: '343(ii)',
    family: '343',
    sub: 'ii',
    chemicalName: 'Dimagnesium phosphate (magnesium hydrogen phosphate)',
    formula: 'MgHPO4',
    hydrates: ['MgHPO4·3H2O'],
    functions: ['acidity regulator', 'anti-caking agent'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['dimagnesium phosphate', 'magnesium hydrogen phosphate'],
      es: 'fosfato dimagnésico',
      fr: 'phosphate dimagnésique',
      de: 'Dimagnesiumphosphat',
      it: 'fosfato dimagnesiaco',
      pt: 'fosfato dimagnésico',
    },
  }),
  entry({
    ins: '343(iii)',
    family: '343',
    sub: 'iii',
    chemicalName: 'Trimagnesium phosphate',
    formula: 'Mg3(PO4)2',
    functions: ['acidity regulator', 'anti-caking agent'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'trimagnesium phosphate',
      es: 'fosfato trimagnésico',
      fr: 'phosphate trimagnésique',
      de: 'Trimagnesiumphosphat',
      it: 'fosfato trimagnesiaco',
      pt: 'fosfato trimagnésico',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    ins: '342(i)',
    family: '342',
    sub: 'i',
    chemicalName: 'Monoammonium phosphate (ammonium dihydrogen phosphate)',
    formula: 'NH4H2PO4',
    functions: ['acidity regulator', 'yeast food'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['monoammonium phosphate', 'ammonium dihydrogen phosphate'],
      es: 'fosfato monoamónico',
      fr: 'phosphate monoammonique',
      de: ['Monoammoniumphosphat', 'Ammoniumdihydrogenphosphat'],
      it: 'fosfato monoammonico',
      pt: 'fosfato monoamónico',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    ins: '342(ii)',
    family: '342',
    sub: 'ii',
    chemicalName: 'Diammonium phosphate (diammonium hydrogen phosphate)',
    formula: '(NH4)2HPO4',
    functions: ['acidity regulator', 'yeast food'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['diammonium phosphate', 'diammonium hydrogen phosphate'],
      es: 'fosfato diamónico',
      fr: 'phosphate diammonique',
      de: ['Diammoniumphosphat', 'Diammoniumhydrogenphosphat'],
      it: 'fosfato diammonico',
      pt: 'fosfato diamónico',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    e: '450(i)',
    ins: '450(i)',
    family: '450',
    sub: 'i',
    chemicalName: 'Disodium diphosphate (sodium acid pyrophosphate)',
    formula: 'Na2H2P2O7',
    functions: ['leavening acid', 'sequestrant', 'colour retention (potato products)'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    abbreviations: ['SAPP'],
    labelNames: {
      en: [
        'disodium diphosphate',
        'sodium acid pyrophosphate',
        'disodium pyrophosphate',
        'disodium dihydrogen diphosphate',
      ],
      es: ['difosfato disódico', 'pirofosfato ácido de sodio'],
      fr: ['diphosphate disodique', 'pyrophosphate acide de sodium'],
      de: ['Dinatriumdiphosphat', 'Dinatriumdihydrogendiphosphat'],
      it: ['difosfato disodico', 'pirofosfato acido di sodio'],
      pt: ['difosfato dissódico', 'pirofosfato ácido de sódio'],
    },
  }),
  entry({
    e: '450(ii)',
    ins: '450(ii)',
    family: '450',
    sub: 'ii',
    chemicalName: 'Trisodium diphosphate',
    formula: 'Na3HP2O7',
    functions: ['acidity regulator', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['trisodium diphosphate', 'trisodium pyrophosphate'],
      es: 'difosfato trisódico',
      fr: 'diphosphate trisodique',
      de: 'Trinatriumdiphosphat',
      it: 'difosfato trisodico',
      pt: 'difosfato trissódico',
    },
  }),
  entry({
    e: '450(iii)',
    ins: '450(iii)',
    family: '450',
    sub: 'iii',
    chemicalName: 'Tetrasodium diphosphate',
    formula: 'Na4P2O7',
    hydrates: ['Na4P2O7·10H2O'],
    functions: ['emulsifying salt', 'sequestrant', 'acidity regulator'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    abbreviations: ['TSPP'],
    labelNames: {
      en: ['tetrasodium diphosphate', 'tetrasodium pyrophosphate'],
      es: 'difosfato tetrasódico',
      fr: 'diphosphate tétrasodique',
      de: 'Tetranatriumdiphosphat',
      it: 'difosfato tetrasodico',
      pt: 'difosfato tetrassódico',
    },
  }),
  entry({
    ins: '450(iv)',
    family: '450',
    sub: 'iv',
    chemicalName: 'Dipotassium diphosphate',
    formula: 'K2H2P2O7',
    functions: ['acidity regulator'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'dipotassium diphosphate',
      es: 'difosfato dipotásico',
      fr: 'diphosphate dipotassique',
      de: 'Dikaliumdiphosphat',
      it: 'difosfato dipotassico',
      pt: 'difosfato dipotássico',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    e: '450(v)',
    ins: '450(v)',
    family: '450',
    sub: 'v',
    chemicalName: 'Tetrapotassium diphosphate',
    formula: 'K4P2O7',
    functions: ['emulsifying salt', 'sequestrant'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['tetrapotassium diphosphate', 'tetrapotassium pyrophosphate'],
      es: 'difosfato tetrapotásico',
      fr: 'diphosphate tétrapotassique',
      de: 'Tetrakaliumdiphosphat',
      it: 'difosfato tetrapotassico',
      pt: 'difosfato tetrapotássico',
    },
  }),
  entry({
    e: '450(vi)',
    ins: '450(vi)',
    family: '450',
    sub: 'vi',
    chemicalName: 'Dicalcium diphosphate',
    formula: 'Ca2P2O7',
    functions: ['leavening', 'firming agent'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['dicalcium diphosphate', 'calcium pyrophosphate'],
      es: 'difosfato dicálcico',
      fr: 'diphosphate dicalcique',
      de: 'Dicalciumdiphosphat',
      it: 'difosfato dicalcico',
      pt: 'difosfato dicálcico',
    },
  }),
  entry({
    e: '450(vii)',
    ins: '450(vii)',
    family: '450',
    sub: 'vii',
    chemicalName: 'Calcium dihydrogen diphosphate',
    formula: 'CaH2P2O7',
    functions: ['leavening acid'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'calcium dihydrogen diphosphate',
      es: 'difosfato diácido de calcio',
      fr: 'diphosphate diacide de calcium',
      de: 'Calciumdihydrogendiphosphat',
      it: 'difosfato diacido di calcio',
      pt: 'difosfato diácido de cálcio',
    },
  }),
  entry({
    ins: '450(viii)',
    family: '450',
    sub: 'viii',
    chemicalName: 'Dimagnesium diphosphate',
    formula: 'Mg2P2O7',
    functions: ['acidity regulator'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'dimagnesium diphosphate',
      es: 'difosfato dimagnésico',
      fr: 'diphosphate dimagnésique',
      de: 'Dimagnesiumdiphosphat',
      it: 'difosfato dimagnesiaco',
      pt: 'difosfato dimagnésico',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    e: '450(ix)',
    ins: '450(ix)',
    family: '450',
    sub: 'ix',
    chemicalName: 'Magnesium dihydrogen diphosphate',
    formula: 'MgH2P2O7',
    functions: ['raising agent', 'acidity regulator'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'magnesium dihydrogen diphosphate',
      es: 'difosfato diácido de magnesio',
      fr: 'diphosphate diacide de magnésium',
      de: 'Magnesiumdihydrogendiphosphat',
      it: 'difosfato diacido di magnesio',
      pt: 'difosfato diácido de magnésio',
    },
    notes: 'Added to the EU list by Commission Regulation (EU) No 298/2014.',
  }),
  entry({
    e: '451(i)',
    ins: '451(i)',
    family: '451',
    sub: 'i',
    chemicalName: 'Pentasodium triphosphate (sodium tripolyphosphate)',
    formula: 'Na5P3O10',
    functions: [
      'moisture retention (meat, poultry, seafood brines)',
      'sequestrant',
      'emulsifying salt',
    ],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    abbreviations: ['STPP'],
    labelNames: {
      en: ['pentasodium triphosphate', 'sodium tripolyphosphate', 'sodium triphosphate'],
      es: ['trifosfato pentasódico', 'tripolifosfato de sodio'],
      fr: ['triphosphate pentasodique', 'tripolyphosphate de sodium'],
      de: ['Pentanatriumtriphosphat', 'Natriumtriphosphat'],
      it: ['trifosfato pentasodico', 'tripolifosfato di sodio'],
      pt: ['trifosfato pentassódico', 'tripolifosfato de sódio'],
    },
  }),
  entry({
    e: '451(ii)',
    ins: '451(ii)',
    family: '451',
    sub: 'ii',
    chemicalName: 'Pentapotassium triphosphate',
    formula: 'K5P3O10',
    functions: ['moisture retention', 'sequestrant'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['pentapotassium triphosphate', 'potassium tripolyphosphate'],
      es: 'trifosfato pentapotásico',
      fr: 'triphosphate pentapotassique',
      de: ['Pentakaliumtriphosphat', 'Kaliumtriphosphat'],
      it: 'trifosfato pentapotassico',
      pt: 'trifosfato pentapotássico',
    },
  }),
  entry({
    e: '452(i)',
    ins: '452(i)',
    family: '452',
    sub: 'i',
    chemicalName: 'Sodium polyphosphate (incl. sodium hexametaphosphate)',
    formula: '(NaPO3)n',
    formulaBasis: 'repeat unit NaPO3',
    functions: ['sequestrant', 'emulsifying salt', 'moisture retention'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    abbreviations: ['SHMP'],
    labelNames: {
      en: ['sodium polyphosphate', 'sodium hexametaphosphate', 'sodium metaphosphate'],
      es: ['polifosfato de sodio', 'polifosfato sódico', 'hexametafosfato de sodio'],
      fr: ['polyphosphate de sodium', 'hexamétaphosphate de sodium'],
      de: ['Natriumpolyphosphat', 'Natriumhexametaphosphat'],
      it: ['polifosfato di sodio', 'esametafosfato di sodio'],
      pt: ['polifosfato de sódio', 'hexametafosfato de sódio'],
    },
  }),
  entry({
    e: '452(ii)',
    ins: '452(ii)',
    family: '452',
    sub: 'ii',
    chemicalName: 'Potassium polyphosphate',
    formula: '(KPO3)n',
    formulaBasis: 'repeat unit KPO3',
    functions: ['sequestrant', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['potassium polyphosphate', 'potassium metaphosphate'],
      es: 'polifosfato de potasio',
      fr: 'polyphosphate de potassium',
      de: 'Kaliumpolyphosphat',
      it: 'polifosfato di potassio',
      pt: 'polifosfato de potássio',
    },
  }),
  entry({
    e: '452(iii)',
    ins: '452(iii)',
    family: '452',
    sub: 'iii',
    chemicalName: 'Sodium calcium polyphosphate',
    formula: null,
    formulaBasis: 'variable Na/Ca ratio; range between the NaPO3 and Ca(PO3)2 repeat units',
    functions: ['sequestrant', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'sodium calcium polyphosphate',
      es: 'polifosfato de sodio y calcio',
      fr: 'polyphosphate de sodium et de calcium',
      de: 'Natriumcalciumpolyphosphat',
      it: 'polifosfato di sodio e calcio',
      pt: 'polifosfato de sódio e cálcio',
    },
  }),
  entry({
    e: '452(iv)',
    ins: '452(iv)',
    family: '452',
    sub: 'iv',
    chemicalName: 'Calcium polyphosphate',
    formula: '(Ca(PO3)2)n',
    formulaBasis: 'repeat unit Ca(PO3)2',
    functions: ['sequestrant', 'emulsifying salt'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'calcium polyphosphate',
      es: 'polifosfato de calcio',
      fr: 'polyphosphate de calcium',
      de: 'Calciumpolyphosphat',
      it: 'polifosfato di calcio',
      pt: 'polifosfato de cálcio',
    },
  }),
  entry({
    ins: '452(v)',
    family: '452',
    sub: 'v',
    chemicalName: 'Ammonium polyphosphate',
    formula: '(NH4PO3)n',
    formulaBasis: 'repeat unit NH4PO3',
    functions: ['emulsifier', 'sequestrant'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: 'ammonium polyphosphate',
      es: 'polifosfato de amonio',
      fr: "polyphosphate d'ammonium",
      de: 'Ammoniumpolyphosphat',
      it: 'polifosfato di ammonio',
      pt: 'polifosfato de amónio',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    e: '541',
    ins: '541(i)',
    family: '541',
    sub: 'i',
    chemicalName: 'Sodium aluminium phosphate, acidic',
    formula: 'NaAl3H14(PO4)8·4H2O',
    formulaBasis: 'one of the two specified forms (tetrahydrate)',
    kind: 'aluminium-phosphate',
    functions: ['raising agent (leavening acid)'],
    counted: true,
    countedReason: COUNTED_ALUMINIUM,
    abbreviations: ['SALP'],
    labelNames: {
      en: [
        'sodium aluminium phosphate',
        'sodium aluminum phosphate',
        'acidic sodium aluminium phosphate',
      ],
      es: ['fosfato de aluminio y sodio', 'fosfato ácido de sodio y aluminio'],
      fr: ["phosphate d'aluminium sodique", "phosphate acide d'aluminium et de sodium"],
      de: ['Natriumaluminiumphosphat', 'saures Natriumaluminiumphosphat'],
      it: ['fosfato di alluminio e sodio', 'fosfato acido di sodio e alluminio'],
      pt: ['fosfato de alumínio e sódio', 'fosfato ácido de sódio e alumínio'],
    },
    notes:
      'EU: only the acidic form, and since Regulation (EU) No 380/2012 only in sponge cakes of the Battenberg type (from memory of the number).',
  }),
  entry({
    ins: '541(ii)',
    family: '541',
    sub: 'ii',
    chemicalName: 'Sodium aluminium phosphate, basic',
    formula: null,
    formulaBasis: 'composition not fixed',
    kind: 'aluminium-phosphate',
    functions: ['emulsifying salt (processed cheese)'],
    counted: true,
    countedReason: COUNTED_ALUMINIUM,
    labelNames: {
      en: 'basic sodium aluminium phosphate',
      es: 'fosfato básico de sodio y aluminio',
      fr: "phosphate basique d'aluminium et de sodium",
      de: 'basisches Natriumaluminiumphosphat',
      it: 'fosfato basico di sodio e alluminio',
      pt: 'fosfato básico de sódio e alumínio',
    },
    notes: 'Codex INS only; not on the EU list (from memory).',
  }),
  entry({
    e: '542',
    ins: '542',
    family: '542',
    chemicalName: 'Bone phosphate (essentially calcium hydroxyapatite)',
    formula: 'Ca5(PO4)3OH',
    formulaBasis: 'hydroxyapatite approximation',
    functions: ['anti-caking agent'],
    kind: S,
    counted: true,
    countedReason: COUNTED_INORGANIC,
    labelNames: {
      en: ['bone phosphate', 'edible bone phosphate'],
      es: 'fosfato de huesos',
      fr: "phosphate d'os",
      de: 'Knochenphosphat',
      it: "fosfato d'ossa",
      pt: 'fosfato de ossos',
    },
  }),
  entry({
    e: '442',
    ins: '442',
    family: '442',
    chemicalName: 'Ammonium phosphatides',
    formula: null,
    formulaBasis: 'mixture; about 3.0-3.4% P (from memory)',
    functions: ['emulsifier (chocolate and cocoa products)'],
    kind: 'phospholipid',
    counted: false,
    countedReason: NOT_COUNTED_LECITHIN,
    labelNames: {
      en: 'ammonium phosphatides',
      es: 'fosfátidos de amonio',
      fr: "phosphatides d'ammonium",
      de: 'Ammoniumphosphatide',
      it: "fosfatidi d'ammonio",
      pt: 'fosfatídeos de amónio',
    },
  }),
  entry({
    e: '322',
    ins: '322',
    family: '322',
    chemicalName: 'Lecithins (phospholipids)',
    formula: 'C40H80NO8P',
    formulaBasis:
      'dipalmitoylphosphatidylcholine as an illustrative phospholipid; commercial lecithins contain oil and have less P',
    functions: ['emulsifier', 'antioxidant'],
    kind: 'phospholipid',
    counted: false,
    countedReason: NOT_COUNTED_LECITHIN,
    labelNames: {
      en: ['lecithin', 'lecithins', 'soy lecithin', 'sunflower lecithin'],
      es: ['lecitina', 'lecitinas', 'lecitina de soja'],
      fr: ['lécithine', 'lécithines', 'lécithine de soja'],
      de: ['Lecithin', 'Lecithine', 'Sojalecithin'],
      it: ['lecitina', 'lecitine', 'lecitina di soia'],
      pt: ['lecitina', 'lecitinas', 'lecitina de soja'],
    },
  }),
  ...starch('1410', 'Monostarch phosphate', {
    en: 'monostarch phosphate',
    es: 'fosfato de monoalmidón',
    fr: 'phosphate de monoamidon',
    de: 'Monostärkephosphat',
    it: 'fosfato di monoamido',
    pt: 'fosfato de monoamido',
  }),
  ...starch('1412', 'Distarch phosphate', {
    en: 'distarch phosphate',
    es: 'fosfato de dialmidón',
    fr: 'phosphate de diamidon',
    de: 'Distärkephosphat',
    it: 'fosfato di diamido',
    pt: 'fosfato de diamido',
  }),
  ...starch('1413', 'Phosphated distarch phosphate', {
    en: 'phosphated distarch phosphate',
    es: 'fosfato de dialmidón fosfatado',
    fr: 'phosphate de diamidon phosphaté',
    de: 'phosphatiertes Distärkephosphat',
    it: 'fosfato di diamido fosfatato',
    pt: 'fosfato de diamido fosfatado',
  }),
  ...starch('1414', 'Acetylated distarch phosphate', {
    en: 'acetylated distarch phosphate',
    es: 'fosfato de dialmidón acetilado',
    fr: 'phosphate de diamidon acétylé',
    de: 'acetyliertes Distärkephosphat',
    it: 'fosfato di diamido acetilato',
    pt: 'fosfato de diamido acetilado',
  }),
  ...starch('1442', 'Hydroxypropyl distarch phosphate', {
    en: 'hydroxypropyl distarch phosphate',
    es: 'fosfato de dialmidón hidroxipropilado',
    fr: 'phosphate de diamidon hydroxypropylé',
    de: 'Hydroxypropyldistärkephosphat',
    it: 'fosfato di diamido idrossipropilato',
    pt: 'fosfato de diamido hidroxipropilado',
  }),
  ...ribonucleotides(),
  entry({
    e: '101(ii)',
    ins: '101(ii)',
    family: '101',
    sub: 'ii',
    chemicalName: "Riboflavin 5'-phosphate (sodium salt)",
    formula: 'C17H20N4NaO9P',
    functions: ['colour'],
    kind: 'organic-phosphate',
    counted: false,
    countedReason: NOT_COUNTED_ORGANIC,
    labelNames: {
      en: ["riboflavin 5'-phosphate", "riboflavin-5'-phosphate sodium"],
      es: "riboflavina 5'-fosfato",
      fr: "riboflavine 5'-phosphate",
      de: "Riboflavin-5'-phosphat",
      it: "riboflavina 5'-fosfato",
      pt: "riboflavina 5'-fosfato",
    },
  }),
  entry({
    family: 'fortificant',
    chemicalName: 'Ferric pyrophosphate',
    code: 'ferric pyrophosphate',
    formula: 'Fe4(P2O7)3',
    functions: ['iron fortificant'],
    kind: 'fortificant',
    counted: true,
    countedReason: COUNTED_FORTIFICANT,
    labelNames: {
      en: ['ferric pyrophosphate', 'iron pyrophosphate'],
      es: 'pirofosfato férrico',
      fr: 'pyrophosphate ferrique',
      de: 'Eisen(III)-diphosphat',
      it: 'pirofosfato ferrico',
      pt: 'pirofosfato férrico',
    },
    notes:
      'Mineral substance for fortification (Reg. (EC) No 1925/2006 Annex II; Reg. (EU) No 609/2013), not an E-numbered additive (from memory).',
  }),
  entry({
    family: 'fortificant',
    chemicalName: 'Ferric orthophosphate',
    code: 'ferric orthophosphate',
    formula: 'FePO4',
    functions: ['iron fortificant'],
    kind: 'fortificant',
    counted: true,
    countedReason: COUNTED_FORTIFICANT,
    labelNames: {
      en: ['ferric orthophosphate', 'ferric phosphate', 'iron phosphate'],
      es: ['ortofosfato férrico', 'fosfato férrico'],
      fr: ['orthophosphate ferrique', 'phosphate ferrique'],
      de: ['Eisen(III)-orthophosphat', 'Eisenphosphat'],
      it: ['ortofosfato ferrico', 'fosfato ferrico'],
      pt: ['ortofosfato férrico', 'fosfato férrico'],
    },
    notes:
      'Mineral substance for fortification (Reg. (EC) No 1925/2006 Annex II), not an E-numbered additive (from memory).',
  }),
  entry({
    family: 'fortificant',
    chemicalName: 'Calcium glycerophosphate',
    code: 'calcium glycerophosphate',
    formula: 'C3H7CaO6P',
    functions: ['calcium fortificant'],
    kind: 'fortificant',
    counted: true,
    countedReason:
      'glycerophosphate is split to phosphate in the gut and is used as an oral phosphate source: counted (from memory, no source)',
    labelNames: {
      en: 'calcium glycerophosphate',
      es: 'glicerofosfato de calcio',
      fr: 'glycérophosphate de calcium',
      de: 'Calciumglycerophosphat',
      it: 'glicerofosfato di calcio',
      pt: 'glicerofosfato de cálcio',
    },
    notes:
      'Mineral substance for fortification (Reg. (EC) No 1925/2006 Annex II), not an E-numbered additive (from memory).',
  }),
  entry({
    family: 'fortificant',
    chemicalName: 'Magnesium glycerophosphate',
    code: 'magnesium glycerophosphate',
    formula: 'C3H7MgO6P',
    functions: ['magnesium fortificant'],
    kind: 'fortificant',
    counted: true,
    countedReason:
      'glycerophosphate is split to phosphate in the gut and is used as an oral phosphate source: counted (from memory, no source)',
    labelNames: {
      en: 'magnesium glycerophosphate',
      es: 'glicerofosfato de magnesio',
      fr: 'glycérophosphate de magnésium',
      de: 'Magnesiumglycerophosphat',
      it: 'glicerofosfato di magnesio',
      pt: 'glicerofosfato de magnésio',
    },
    notes:
      'Mineral substance for fortification (Reg. (EC) No 1925/2006 Annex II), not an E-numbered additive (from memory).',
  }),
];

function starch(num: string, name: string, labelNames: Names): AdditiveEntry[] {
  return [
    entry({
      e: num,
      ins: num,
      family: num,
      chemicalName: name,
      formula: null,
      formulaBasis:
        'modified starch; residual phosphate limited by the specification (Reg. (EU) 231/2012)',
      functions: ['thickener', 'stabiliser'],
      kind: 'starch-phosphate',
      counted: false,
      countedReason: NOT_COUNTED_STARCH,
      labelNames,
      notes:
        'Labels often say only "modified starch" (which is not detected: it need not be a phosphate).',
    }),
  ];
}

function ribonucleotides(): AdditiveEntry[] {
  const rows: [string, string, string | null, Names][] = [
    [
      '626',
      'Guanylic acid',
      'C10H14N5O8P',
      {
        en: 'guanylic acid',
        es: 'ácido guanílico',
        fr: 'acide guanylique',
        de: 'Guanylsäure',
        it: 'acido guanilico',
        pt: 'ácido guanílico',
      },
    ],
    [
      '627',
      'Disodium guanylate',
      'C10H12N5Na2O8P',
      {
        en: ['disodium guanylate', "disodium 5'-guanylate"],
        es: 'guanilato disódico',
        fr: 'guanylate disodique',
        de: 'Dinatriumguanylat',
        it: 'guanilato disodico',
        pt: 'guanilato dissódico',
      },
    ],
    [
      '628',
      'Dipotassium guanylate',
      'C10H12K2N5O8P',
      {
        en: 'dipotassium guanylate',
        es: 'guanilato dipotásico',
        fr: 'guanylate dipotassique',
        de: 'Dikaliumguanylat',
        it: 'guanilato dipotassico',
        pt: 'guanilato dipotássico',
      },
    ],
    [
      '629',
      'Calcium guanylate',
      'C10H12CaN5O8P',
      {
        en: 'calcium guanylate',
        es: 'guanilato de calcio',
        fr: 'guanylate de calcium',
        de: 'Calciumguanylat',
        it: 'guanilato di calcio',
        pt: 'guanilato de cálcio',
      },
    ],
    [
      '630',
      'Inosinic acid',
      'C10H13N4O8P',
      {
        en: 'inosinic acid',
        es: 'ácido inosínico',
        fr: 'acide inosinique',
        de: 'Inosinsäure',
        it: 'acido inosinico',
        pt: 'ácido inosínico',
      },
    ],
    [
      '631',
      'Disodium inosinate',
      'C10H11N4Na2O8P',
      {
        en: ['disodium inosinate', "disodium 5'-inosinate"],
        es: 'inosinato disódico',
        fr: 'inosinate disodique',
        de: 'Dinatriuminosinat',
        it: 'inosinato disodico',
        pt: 'inosinato dissódico',
      },
    ],
    [
      '632',
      'Dipotassium inosinate',
      'C10H11K2N4O8P',
      {
        en: 'dipotassium inosinate',
        es: 'inosinato dipotásico',
        fr: 'inosinate dipotassique',
        de: 'Dikaliuminosinat',
        it: 'inosinato dipotassico',
        pt: 'inosinato dipotássico',
      },
    ],
    [
      '633',
      'Calcium inosinate',
      'C10H11CaN4O8P',
      {
        en: 'calcium inosinate',
        es: 'inosinato de calcio',
        fr: 'inosinate de calcium',
        de: 'Calciuminosinat',
        it: 'inosinato di calcio',
        pt: 'inosinato de cálcio',
      },
    ],
    [
      '634',
      "Calcium 5'-ribonucleotides",
      null,
      {
        en: "calcium 5'-ribonucleotides",
        es: "5'-ribonucleótidos de calcio",
        fr: "5'-ribonucléotides calciques",
        de: "Calcium-5'-ribonucleotide",
        it: "5'-ribonucleotidi di calcio",
        pt: "5'-ribonucleótidos de cálcio",
      },
    ],
    [
      '635',
      "Disodium 5'-ribonucleotides",
      null,
      {
        en: ["disodium 5'-ribonucleotides", 'disodium ribonucleotides'],
        es: "5'-ribonucleótidos disódicos",
        fr: "5'-ribonucléotides disodiques",
        de: "Dinatrium-5'-ribonucleotide",
        it: "5'-ribonucleotidi disodici",
        pt: "5'-ribonucleótidos dissódicos",
      },
    ],
  ];
  return rows.map(([num, name, formula, labelNames]) =>
    entry({
      e: num,
      ins: num,
      family: num,
      chemicalName: name,
      formula,
      formulaBasis: formula
        ? 'anhydrous; commercial salts are hydrates with less P'
        : 'mixture of the guanylate and inosinate salts',
      functions: ['flavour enhancer'],
      kind: 'organic-phosphate',
      counted: false,
      countedReason: NOT_COUNTED_ORGANIC,
      labelNames,
      hydrates: num === '627' || num === '631' ? [`${formula as string}·7H2O`] : [],
    }),
  );
}

// Mixtures and families get the range of their members' computed fractions.
function rangeOf(fractions: (number | null)[]): { min: number; max: number } | null {
  const xs = fractions.filter((x): x is number => x !== null);
  return xs.length === 0 ? null : { min: Math.min(...xs), max: Math.max(...xs) };
}
for (const e of SUBSTANCES) {
  if (e.family === '452' && e.subNumber === 'iii') {
    e.pMassFractionRange = rangeOf([
      phosphorusMassFraction('NaPO3'),
      phosphorusMassFraction('Ca(PO3)2'),
    ]);
  }
  if (e.family === '634')
    e.pMassFractionRange = rangeOf(
      SUBSTANCES.filter((x) => x.family === '629' || x.family === '633').map(
        (x) => x.pMassFraction,
      ),
    );
  if (e.family === '635')
    e.pMassFractionRange = rangeOf(
      SUBSTANCES.filter((x) => x.family === '627' || x.family === '631').map(
        (x) => x.pMassFraction,
      ),
    );
}

interface FamilySpec {
  family: string;
  chemicalName: string;
  functions: string[];
  labelNames: Names;
  kind?: AdditiveKind;
}

function familyEntry(f: FamilySpec): AdditiveEntry {
  const members = SUBSTANCES.filter((s) => s.family === f.family);
  const eu = members.some((m) => m.euAuthorised);
  const first = members[0] as AdditiveEntry;
  return {
    code: eu ? `E ${f.family}` : `INS ${f.family}`,
    eNumber: eu ? `E ${f.family}` : null,
    insNumber: f.family,
    family: f.family,
    subNumber: null,
    level: 'family',
    chemicalName: f.chemicalName,
    formula: null,
    formulaBasis: 'family: see the members',
    pMassFraction: null,
    hydrates: [],
    pMassFractionRange: rangeOf(
      members.flatMap((m) => [
        m.pMassFraction,
        m.pMassFractionRange?.min ?? null,
        m.pMassFractionRange?.max ?? null,
      ]),
    ),
    functions: f.functions,
    kind: f.kind ?? first.kind,
    counted: first.counted,
    countedReason: first.countedReason,
    euAuthorised: eu,
    codexListed: true,
    labelNames: names(f.labelNames),
    abbreviations: [],
    notes: `Named without sub-number; members: ${members.map((m) => m.code).join(', ')}.`,
  };
}

const FAMILIES: AdditiveEntry[] = [
  familyEntry({
    family: '339',
    chemicalName: 'Sodium phosphates',
    functions: ['acidity regulator', 'emulsifying salt'],
    labelNames: {
      en: ['sodium phosphates', 'sodium phosphate'],
      es: ['fosfatos de sodio', 'fosfato de sodio', 'fosfatos sódicos'],
      fr: ['phosphates de sodium', 'phosphate de sodium'],
      de: ['Natriumphosphate', 'Natriumphosphat'],
      it: ['fosfati di sodio', 'fosfato di sodio'],
      pt: ['fosfatos de sódio', 'fosfato de sódio'],
    },
  }),
  familyEntry({
    family: '340',
    chemicalName: 'Potassium phosphates',
    functions: ['acidity regulator', 'emulsifying salt'],
    labelNames: {
      en: ['potassium phosphates', 'potassium phosphate'],
      es: ['fosfatos de potasio', 'fosfato de potasio'],
      fr: ['phosphates de potassium', 'phosphate de potassium'],
      de: ['Kaliumphosphate', 'Kaliumphosphat'],
      it: ['fosfati di potassio', 'fosfato di potassio'],
      pt: ['fosfatos de potássio', 'fosfato de potássio'],
    },
  }),
  familyEntry({
    family: '341',
    chemicalName: 'Calcium phosphates',
    functions: ['raising agent', 'anti-caking agent', 'calcium fortificant'],
    labelNames: {
      en: ['calcium phosphates', 'calcium phosphate'],
      es: ['fosfatos de calcio', 'fosfato de calcio', 'fosfatos cálcicos'],
      fr: ['phosphates de calcium', 'phosphate de calcium'],
      de: ['Calciumphosphate', 'Calciumphosphat', 'Kalziumphosphat'],
      it: ['fosfati di calcio', 'fosfato di calcio'],
      pt: ['fosfatos de cálcio', 'fosfato de cálcio'],
    },
  }),
  familyEntry({
    family: '342',
    chemicalName: 'Ammonium phosphates',
    functions: ['acidity regulator', 'yeast food'],
    labelNames: {
      en: ['ammonium phosphates', 'ammonium phosphate'],
      es: ['fosfatos de amonio', 'fosfato de amonio'],
      fr: ["phosphates d'ammonium", "phosphate d'ammonium"],
      de: ['Ammoniumphosphate', 'Ammoniumphosphat'],
      it: ['fosfati di ammonio', 'fosfato di ammonio'],
      pt: ['fosfatos de amónio', 'fosfato de amônio'],
    },
  }),
  familyEntry({
    family: '343',
    chemicalName: 'Magnesium phosphates',
    functions: ['acidity regulator', 'anti-caking agent'],
    labelNames: {
      en: ['magnesium phosphates', 'magnesium phosphate'],
      es: ['fosfatos de magnesio', 'fosfato de magnesio'],
      fr: ['phosphates de magnésium', 'phosphate de magnésium'],
      de: ['Magnesiumphosphate', 'Magnesiumphosphat'],
      it: ['fosfati di magnesio', 'fosfato di magnesio'],
      pt: ['fosfatos de magnésio', 'fosfato de magnésio'],
    },
  }),
  familyEntry({
    family: '450',
    chemicalName: 'Diphosphates (pyrophosphates)',
    functions: ['raising agent', 'emulsifying salt', 'sequestrant'],
    labelNames: {
      en: ['diphosphates', 'pyrophosphates', 'sodium pyrophosphate'],
      es: ['difosfatos', 'pirofosfatos'],
      fr: ['diphosphates', 'pyrophosphates'],
      de: ['Diphosphate', 'Pyrophosphate'],
      it: ['difosfati', 'pirofosfati'],
      pt: ['difosfatos', 'pirofosfatos'],
    },
  }),
  familyEntry({
    family: '451',
    chemicalName: 'Triphosphates',
    functions: ['moisture retention', 'sequestrant'],
    labelNames: {
      en: ['triphosphates', 'tripolyphosphates'],
      es: ['trifosfatos', 'tripolifosfatos'],
      fr: ['triphosphates', 'tripolyphosphates'],
      de: ['Triphosphate'],
      it: ['trifosfati', 'tripolifosfati'],
      pt: ['trifosfatos', 'tripolifosfatos'],
    },
  }),
  familyEntry({
    family: '452',
    chemicalName: 'Polyphosphates',
    functions: ['sequestrant', 'emulsifying salt', 'moisture retention'],
    labelNames: {
      en: ['polyphosphates', 'polyphosphate'],
      es: ['polifosfatos', 'polifosfato'],
      fr: ['polyphosphates', 'polyphosphate'],
      de: ['Polyphosphate', 'Polyphosphat'],
      it: ['polifosfati', 'polifosfato'],
      pt: ['polifosfatos', 'polifosfato'],
    },
  }),
];

/** Unspecified phosphate ("phosphates", "phosphate salts") with no cation or number named. */
const UNSPECIFIED: AdditiveEntry = {
  code: 'phosphate',
  eNumber: null,
  insNumber: null,
  family: 'phosphate',
  subNumber: null,
  level: 'family',
  chemicalName: 'Phosphate (salt not named)',
  formula: null,
  formulaBasis: 'not known',
  pMassFraction: null,
  hydrates: [],
  pMassFractionRange: rangeOf(
    SUBSTANCES.filter((s) => s.kind === 'inorganic-phosphate').map((s) => s.pMassFraction),
  ),
  functions: ['not stated'],
  kind: 'unspecified-phosphate',
  counted: true,
  countedReason: `${COUNTED_INORGANIC}; the salt is not named`,
  euAuthorised: false,
  codexListed: false,
  labelNames: names({
    en: ['phosphates', 'phosphate'],
    es: ['fosfatos', 'fosfato'],
    fr: ['phosphates', 'phosphate'],
    de: ['Phosphate', 'Phosphat'],
    it: ['fosfati', 'fosfato'],
    pt: ['fosfatos', 'fosfato'],
  }),
  abbreviations: [],
  notes: 'Reported when a label names "phosphates" without a cation, number or family.',
};

/** The whole catalogue: substances, then families, then the unspecified entry. */
export const ADDITIVE_CATALOGUE: readonly AdditiveEntry[] = Object.freeze([
  ...SUBSTANCES,
  ...FAMILIES,
  UNSPECIFIED,
]);

const BY_KEY = new Map<string, AdditiveEntry>();
for (const e of ADDITIVE_CATALOGUE) {
  if (e.insNumber) BY_KEY.set(e.insNumber, e);
  if (e.eNumber) BY_KEY.set(e.eNumber.slice(2), e);
  if (e.level === 'family' || (e.subNumber === null && e.family !== 'fortificant'))
    BY_KEY.set(e.family, e);
}
// E 541 without sub-number is the acidic form on the EU list.
BY_KEY.set('541', BY_KEY.get('541(i)') as AdditiveEntry);
BY_KEY.set('101', BY_KEY.get('101(ii)') as AdditiveEntry);

/** Entry for a number: "339", "339(ii)"; a family when the sub-number is absent. */
export function findByNumber(family: string, subNumber?: string | null): AdditiveEntry | undefined {
  if (subNumber) return BY_KEY.get(`${family}(${subNumber})`);
  return BY_KEY.get(family);
}

/** Entry by display code ("E 339(ii)", "INS 342(i)", "ferric pyrophosphate", "phosphate"). */
export function findByCode(code: string): AdditiveEntry | undefined {
  return ADDITIVE_CATALOGUE.find((e) => e.code === code);
}

/** Families whose numbers are phosphorus additives (for the number scanner). */
export const PHOSPHATE_FAMILIES: ReadonlySet<string> = new Set(
  ADDITIVE_CATALOGUE.filter((e) => /^\d+$/.test(e.family)).map((e) => e.family),
);

export const UNSPECIFIED_PHOSPHATE = UNSPECIFIED;

/**
 * Dutch label names (nl), by catalogue code: the Dutch language version of Regulation (EC)
 * No 1333/2008 Annex II and common Dutch label wording (from memory). Kept beside the six
 * catalogue languages; `test/additives/label-languages.test.ts` checks the analyser reads each.
 */
export const DUTCH_LABEL_NAMES: Readonly<Record<string, readonly string[]>> = Object.freeze({
  'E 338': ['fosforzuur', 'orthofosforzuur'],
  'E 339(i)': ['mononatriumfosfaat', 'natriumdiwaterstoffosfaat'],
  'E 339(ii)': ['dinatriumfosfaat', 'dinatriumwaterstoffosfaat'],
  'E 339(iii)': ['trinatriumfosfaat'],
  'E 340(i)': ['monokaliumfosfaat', 'kaliumdiwaterstoffosfaat'],
  'E 340(ii)': ['dikaliumfosfaat'],
  'E 340(iii)': ['trikaliumfosfaat'],
  'E 341(i)': ['monocalciumfosfaat', 'calciumdiwaterstoffosfaat'],
  'E 341(ii)': ['dicalciumfosfaat'],
  'E 341(iii)': ['tricalciumfosfaat'],
  'E 450(i)': ['dinatriumdifosfaat'],
  'E 450(iii)': ['tetranatriumdifosfaat'],
  'E 451(i)': ['pentanatriumtrifosfaat'],
  'E 452(i)': ['natriumpolyfosfaat'],
  phosphate: ['fosfaten', 'fosfaat'],
});
