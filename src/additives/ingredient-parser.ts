/**
 * Finds phosphorus-containing additives in a food's ingredient statement.
 *
 * Pure and total: any input gives a result, nothing is thrown. Works on a folded copy of the
 * text (lower case, no diacritics, label hyphenation and line breaks undone) and maps every
 * match back to offsets in the text as given.
 */
import {
  ADDITIVE_CATALOGUE,
  ADDITIVE_CATALOGUE_VERSION,
  LABEL_LANGUAGES,
  PHOSPHATE_FAMILIES,
  UNSPECIFIED_PHOSPHATE,
  findByCode,
  findByNumber,
  type AdditiveEntry,
  type LabelLanguage,
} from './catalogue.js';

export { ADDITIVE_CATALOGUE_VERSION };

export interface AdditiveFinding {
  /** Catalogue code, e.g. "E 339(ii)", "E 450", "INS 342(i)", "ferric pyrophosphate". */
  code: string;
  /** Main number as a string ("339"); "fortificant" or "phosphate" for un-numbered entries. */
  family: string;
  name: string;
  /** The text as written on the label, from `start` to `end`. */
  matchedText: string;
  /** Offsets (UTF-16 code units) into the given text; `end` is exclusive. */
  start: number;
  end: number;
  /** Counted as additive phosphorus (inorganic phosphate). */
  counted: boolean;
  reason: string;
}

export interface IngredientAnalysis {
  additives: AdditiveFinding[];
}

// ---------------------------------------------------------------------------------------------
// Folding

interface Folded {
  norm: string;
  /** norm index -> index into the original text; null when they are the same */
  map: number[] | null;
}

const foldCache = new Map<string, string>();

function foldChar(ch: string): string {
  let f = foldCache.get(ch);
  if (f === undefined) {
    if (ch === 'ß') f = 'ss';
    else if (/[\u2010-\u2015\u2212\u00ad]/.test(ch)) f = ch === '\u00ad' ? '' : '-';
    else if (/[\u2018\u2019\u201b\u2032\u00b4`]/.test(ch)) f = "'";
    else if (/\s/.test(ch)) f = ' ';
    else
      f = ch
        .normalize('NFD')
        .replace(/[\u0300-\u036f]/g, '')
        .toLowerCase();
    if (foldCache.size < 4096) foldCache.set(ch, f);
  }
  return f;
}

function isLetterCode(c: number): boolean {
  return c >= 97 && c <= 122;
}

/** Lower case, diacritics removed, soft hyphens dropped, "phos-\nphate" joined, breaks as spaces. */
// Printable ASCII without line breaks: folding is lower-casing and offsets do not move.
const PLAIN_ASCII_RE = /^[\x20-\x7e]*$/;

function fold(text: string): Folded {
  if (PLAIN_ASCII_RE.test(text)) return { norm: text.toLowerCase(), map: null };
  const n = text.length;
  // Folding can at most double a character (ß -> ss); buffers sized for that.
  const buf = new Uint16Array(2 * n + 2);
  const map: number[] = new Array<number>(2 * n + 2);
  let k = 0;
  for (let i = 0; i < n; i++) {
    const code = text.charCodeAt(i);
    if (code < 128) {
      if (code === 10 || code === 13) {
        // Hyphenation at a line break: letter, '-', break, letter -> join the two halves.
        if (k >= 2 && buf[k - 1] === 45 && isLetterCode(buf[k - 2] as number)) {
          let j = i;
          while (j < n && /\s/.test(text[j] as string)) j++;
          const next = j < n ? foldChar(text[j] as string) : '';
          if (next.length > 0 && isLetterCode(next.charCodeAt(0))) {
            k--; // drop the hyphen
            i = j - 1;
            continue;
          }
        }
        buf[k] = 32;
      } else {
        buf[k] = code >= 65 && code <= 90 ? code + 32 : code === 9 ? 32 : code;
      }
      map[k++] = i;
      continue;
    }
    if (code >= 0xd800 && code <= 0xdbff && i + 1 < n) {
      // Astral characters (emoji and the like) carry no letters we match: one space for both halves.
      buf[k] = 32;
      map[k++] = i;
      i++;
      continue;
    }
    if (code >= 0xd800 && code <= 0xdfff) {
      buf[k] = 32; // a lone surrogate
      map[k++] = i;
      continue;
    }
    const f = foldChar(text[i] as string);
    for (let q = 0; q < f.length; q++) {
      buf[k] = f.charCodeAt(q);
      map[k++] = i;
    }
  }
  map.length = k;
  let norm = '';
  for (let q = 0; q < k; q += 8192)
    norm += String.fromCharCode.apply(
      null,
      buf.subarray(q, Math.min(k, q + 8192)) as unknown as number[],
    );
  return { norm, map };
}

// ---------------------------------------------------------------------------------------------
// Tokens

type TokenType = 'w' | 'n' | 'p';
interface Token {
  t: string;
  s: number; // start in norm
  e: number; // end in norm (exclusive)
  type: TokenType;
}

const TOKEN_RE = /[a-z]+|\d+|[^\sa-z\d]/g;

function tokenize(norm: string): Token[] {
  const tokens: Token[] = [];
  TOKEN_RE.lastIndex = 0;
  let m: RegExpExecArray | null;
  while ((m = TOKEN_RE.exec(norm)) !== null) {
    const t = m[0];
    const c = t.charCodeAt(0);
    const type: TokenType = isLetterCode(c) ? 'w' : c >= 48 && c <= 57 ? 'n' : 'p';
    tokens.push({ t, s: m.index, e: m.index + t.length, type });
  }
  return tokens;
}

// ---------------------------------------------------------------------------------------------
// Word classes (folded text)

type Cation = 'Na' | 'K' | 'Ca' | 'Mg' | 'NH4' | 'Al' | 'Fe' | 'bone';
type Anion = 'ortho' | 'di' | 'tri' | 'poly';

const MULT: Record<string, number> = { mono: 1, di: 2, tri: 3, tetra: 4, penta: 5 };

const CATION_STEMS: [RegExp, Cation][] = [
  [/^(sodium|natrium|sodio|sod)$/, 'Na'],
  [/^(potassium|kalium|potasio|potassio|potass?)$/, 'K'],
  [/^(calcium|kalzium|calcio|calc)$/, 'Ca'],
  [/^(magnesium|magnesio|magnes)$/, 'Mg'],
  [/^(ammonium|amonio|ammonio|amm?on)$/, 'NH4'],
  [/^(aluminium|aluminum|aluminio|alluminio|alumin)$/, 'Al'],
  [/^(ferric|ferrique|ferrico|ferrous|iron|eisen|fer|ferro|hierro)$/, 'Fe'],
  [/^(bone|knochen|os|ossa|ossos|osso|huesos|hueso)$/, 'bone'],
];

function cationOf(stem: string): Cation | null {
  for (const [re, c] of CATION_STEMS) if (re.test(stem)) return c;
  return null;
}

/** English/German noun with multiplicity prefix: "disodium", "trinatrium", "calcium". */
const CATION_NOUN_RE =
  /^(mono|di|tri|tetra|penta)?(sodium|potassium|calcium|magnesium|ammonium|aluminium|aluminum|natrium|kalium|kalzium|ferric|ferrous|iron|eisen|bone|knochen)$/;
/** Romance noun after "de/di/d'": "sodio", "disodium", "dissodio", "calcio", "fer". */
const CATION_NOUN_ROMANCE_RE =
  /^(mono|di|tri|tetra|penta)?s?(sodium|sodio|potassium|potasio|potassio|calcium|calcio|magnesium|magnesio|ammonium|amonio|ammonio|aluminium|aluminio|alluminio|fer|ferro|hierro|os|ossa|ossos|osso|huesos|hueso)$/;
/** Romance adjective: "disodique", "monosodico", "dissodico", "tricalcique", "ferrique". */
const CATION_ADJ_RE =
  /^(mono|di|tri|tetra|penta)?(s?sod|potass?|calc|magnes|amm?on|alumin)(ic|iqu|iac)(o|a|os|as|i|he|e|es|ue|ues|he)?$|^(ferric|ferrique|ferrico|ferrica)$/;

const CONJ = new Set([
  'and',
  'or',
  'y',
  'o',
  'et',
  'ou',
  'und',
  'oder',
  'e',
  'ed',
  'u',
  'en',
  '&',
  '/',
  ',',
  '+',
]);
const PREP = new Set(['de', 'di', 'd', 'of', 'du', 'des', 'da', 'do', 'del', 'della', 'von']);

/** Phosphate anion word: "phosphate(s)", "fosfato(s)", "fosfati", "diphosphates", "polifosfati". */
const PHOS_STEM_RE =
  /^(ortho|orto|di|tri|tripoly|tripoli|poly|poli|pyro|piro|hexameta|esameta|meta|dihydrogeno|hydrogeno|dihidrogeno|hidrogeno|diidrogeno|idrogeno)?(?:ph|f)os(?:ph|p|f|h)?a{1,2}t(?:e|es|o|os|i|a|as|en|s)?$/;
/** German (or joined) compound: "dinatriumdiphosphat", "natriumaluminiumphosphat". */
const PHOS_COMPOUND_RE =
  /^(mono|di|tri|tetra|penta)?(natrium|kalium|calcium|kalzium|magnesium|ammonium|sodium|potassium|eisen|knochen)(aluminium|calcium)?(dihydrogen|hydrogen|diwaterstof|waterstof)?(ortho|di|tri|poly|pyro|hexameta|meta)?(?:ph|f)os(?:ph|p|f)?h?a{1,2}t(?:e|en|es|s)?$/;
const ACID_ADJ_RE = /^(ortho|orto)?(?:ph|f)os(?:ph|p|f)?or(ic|ique|ico|ous|us|ik)$/;
/** German "Phosphorsäure", Dutch "fosforzuur". */
const ACID_COMPOUND_RE = /^(ortho)?(?:ph|f)osp?h?ors(a|ae)ure$|^(ortho)?fosforzuur$/;
/**
 * Last resort for languages without listed names (Polish "fosforany", Swedish "difosfater",
 * Finnish "fosfaatti", Hungarian "foszfatok"): a word with a phosphate stem that no rule above
 * read is reported as an unspecified phosphate, so it is never silently missed.
 */
const PHOS_ANY_STEM_RE = /phosph|fosf|foszf/;
/** Words with the stem that name the element or its nutrient value, or non-additive phosphorus compounds. */
const NOT_AN_ADDITIVE_STEM_RE =
  /^(phosphor|phosphore|phosphorus|fosforo|fosfor|fosforu|fosforas|foszfor|phosphorous)$|^(phosphati|fosfati|phospholip|fosfolip|glycerophosph|glicerofosf|phosphoresc|fosforesc|phosphoryl|fosforyl)|(frei|vrij|fri|free|fritt|mentes|ase|asa|asy|aza)$/;
const ACID_WORD_RE = /^(acid|acide|acido)$/;
const PHOSPHATIDE_RE =
  /^(ammonium)?(?:ph|f)osfatid(e|es|i|os|eos)?$|^(ammonium)?phosphatid(e|es|i|os|eos)?$/;
const LECITHIN_RE = /^(soja|soy|sonnenblumen|raps)?le[cz]it?h?in(e|es|s|a|as)?$/;
const NUCLEOTIDE_RE =
  /^(mono|di)?(natrium|kalium|calcium|sodium|potassium)?(guan[yi]l|inosin)(ate|ates|ato|atos|at|ic|ique|ico|saure|saeure)?$/;
const RIBONUCLEOTIDE_RE = /^(natrium|calcium|dinatrium)?ribonu[ck]leot[iy]d(e|es|i|os)?$/;
const GLYCERO_RE =
  /^(calcium|magnesium|natrium|kalium)?(glycero|glicero)(?:ph|f)osfat(e|es|o|os|i)?$|^(calcium|magnesium)?glycerophosphat(e|es)?$/;
const STARCH_RE = /^(mono|di)?(starch|amidon|almidon|amido|starke|staerke)$/;
const STARCH_COMPOUND_RE = /^(hydroxypropyl)?(mono|di)?st(a|ae)rkephosphat(e)?$/;
const STARCH_QUALIFIER: [RegExp, string][] = [
  [/^(acetyl|acetil)\w*$/, '1414'],
  [/^(hydroxypropyl|hidroxipropil|idrossipropil)\w*$/, '1442'],
  [/^(phosphated|phosphate|phosphatiert\w*|fosfatad[oa]|fosfatat[oa])$/, '1413'],
];
/** Organic phosphate esters that are vitamins, not additives: "pyridoxal 5'-phosphate". */
const ORGANIC_ESTER_RE =
  /^(ascorbyl|ascorbil|pyridoxal|pyridoxine|piridoxal|thiamine|thiamin|tiamina|glucose|fructose|creatine|nicotinamide|adenosine|menadiol|tocopheryl|tocoferil)$/;
const RIBOFLAVIN_RE = /^(riboflavin|riboflavine|riboflavina)$/;
const ROMAN = new Set(['i', 'ii', 'iii', 'iv', 'v', 'vi', 'vii', 'viii', 'ix']);
const UNIT_RE = /^(mg|g|kg|mcg|ug|ml|l|kcal|kj|iu|ie|ui|mmol|mol|ppm)$/;
const VITAMIN_RE = /^(vitamin|vitamine|vitamina|vit|vitamins|vitamines|vitaminas)$/;
/** Words that name an additive class, after which bare numbers are INS numbers (": 451, 452"). */
const CLASS_WORD_RE =
  /^(emul|salt|sel|sale|sali|sais|salz|zuurte|smeltzout|rijsmiddel|verdikk|raising|leaven|agent|acid|regulat|correct|regol|stabil|estabil|thicken|espes|epaiss|verdick|addens|antioxid|antiossid|sequestr|humect|umid|feucht|firm|enhanc|potenci|exhaust|esalt|intensif|anti|mineral|improv|gasific|leud|levant|lievit|trieb|fermen|conserv|preserv|colou?r|farb|additi|aditiv|stoff|mittel)/;

const ABBREVIATIONS = new Map<string, AdditiveEntry>();
for (const e of ADDITIVE_CATALOGUE)
  for (const a of e.abbreviations) ABBREVIATIONS.set(a.toLowerCase(), e);

// Cheap pre-check on the raw text (accents allowed between letters): no hit, no phosphate.
/** Letter sequences every matched name contains (folded text). */
const NAME_GATE_RE =
  /phos|fos|osph|ospat|hosp|lec|lez|guan|inosin|ribonu|sapp|stpp|shmp|tspp|salp|i\s*\+\s*g/;

const QUICK_RE = /\d\d\d|ph?os|f[oó]s|l\S?[cz]\S?t|guan|inos|ribon|sapp|stpp|shmp|tspp|salp|\+/i;

// ---------------------------------------------------------------------------------------------

interface Raw {
  entry: AdditiveEntry;
  s: number; // norm offsets
  e: number;
  how: string;
  byNumber: boolean;
  /** Findings read from one phrase naming several salts may overlap each other. */
  group?: number;
}

function entryOrFamily(family: string, sub: string | null): AdditiveEntry | undefined {
  return (sub ? findByNumber(family, sub) : undefined) ?? findByNumber(family);
}

function byCodeStrict(code: string): AdditiveEntry {
  const e = findByCode(code);
  if (!e) throw new Error(`catalogue has no ${code}`); // a bug in this module, caught by tests
  return e;
}

/** Maps a cation, its multiplicity and the anion to a catalogue entry. */
function saltEntry(
  cation: Cation,
  mult: number | null,
  hydrogen: number | null,
  anion: Anion,
  acid: boolean,
  basic: boolean,
): AdditiveEntry {
  const pick = (family: string, sub: string | null) => entryOrFamily(family, sub) as AdditiveEntry;
  if (cation === 'Fe')
    return byCodeStrict(anion === 'di' ? 'ferric pyrophosphate' : 'ferric orthophosphate');
  if (cation === 'bone') return pick('542', null);
  if (cation === 'Al') return pick('541', basic ? 'ii' : 'i');
  const byMono = (m: number | null, h: number | null): string | null => {
    if (m === 1 || h === 2) return 'i';
    if (m === 2 || h === 1) return 'ii';
    if (m === 3) return 'iii';
    return null;
  };
  if (anion === 'ortho') {
    const fam = { Na: '339', K: '340', Ca: '341', Mg: '343', NH4: '342' }[cation];
    return pick(fam, byMono(mult, hydrogen));
  }
  if (anion === 'di') {
    if (cation === 'Na') {
      if (mult === 2 || acid || hydrogen === 2) return pick('450', 'i');
      return pick('450', mult === 3 ? 'ii' : mult === 4 ? 'iii' : null);
    }
    if (cation === 'K') return pick('450', mult === 2 ? 'iv' : mult === 4 ? 'v' : null);
    if (cation === 'Ca') return pick('450', hydrogen === 2 || mult === 1 || acid ? 'vii' : 'vi');
    if (cation === 'Mg')
      return pick('450', hydrogen === 2 || mult === 1 ? 'ix' : mult === 2 ? 'viii' : null);
    return pick('450', null);
  }
  if (anion === 'tri') {
    return pick('451', cation === 'Na' ? 'i' : cation === 'K' ? 'ii' : null);
  }
  return pick('452', { Na: 'i', K: 'ii', Ca: 'iv', NH4: 'v', Mg: null }[cation]);
}

function anionOf(prefix: string | undefined): Anion {
  switch (prefix) {
    case 'di':
    case 'pyro':
    case 'piro':
      return 'di';
    case 'tri':
    case 'tripoly':
    case 'tripoli':
      return 'tri';
    case 'poly':
    case 'poli':
    case 'hexameta':
    case 'esameta':
    case 'meta':
      return 'poly';
    default:
      return 'ortho';
  }
}

interface CationHit {
  cation: Cation;
  mult: number | null;
  idx: number; // token index
}

/** Scans the tokens of a folded statement and returns raw findings in norm offsets. */
function scan(norm: string, tokens: Token[], hasNumbers: boolean, hasNames: boolean): Raw[] {
  const raws: Raw[] = [];
  const consumed = new Uint8Array(tokens.length);
  const n = tokens.length;
  const tok = (i: number): Token | undefined => (i >= 0 && i < n ? tokens[i] : undefined);
  const word = (i: number): string => {
    const t = tok(i);
    return t && t.type === 'w' ? t.t : '';
  };

  // ---- numbers: E 339, E-339(ii), E450iii, INS 451, bare numbers in an additive list
  let listOpen = false;
  for (let i = 0; hasNumbers && i < n; i++) {
    const t = tokens[i] as Token;
    if (t.type === 'w') {
      if ((t.t === 'e' || t.t === 'ins') && tok(i + 1)) {
        let j = i + 1;
        if (tok(j)?.t === '-') j++;
        const num = tok(j);
        if (num && num.type === 'n' && num.t.length >= 3 && num.t.length <= 4 && num.s - t.e <= 3) {
          const got = readCode(j, true, i);
          if (got) {
            i = got;
            listOpen = true;
            continue;
          }
        }
      }
      if (CONJ.has(t.t)) continue;
      if (listOpen && (t.t === 'and' || t.t === 'or')) continue;
      listOpen = false;
      const next = tok(i + 1);
      if (next && (next.t === ':' || next.t === '(' || next.t === '[') && CLASS_WORD_RE.test(t.t)) {
        // "emulsifying salts: 339" / "mineral salts (451, 452)"
        listOpen = true;
        i++;
      }
      continue;
    }
    if (t.type === 'n') {
      if (listOpen && t.t.length >= 3 && t.t.length <= 4) {
        const got = readCode(i, false, i);
        if (got) {
          i = got;
          continue;
        }
      }
      listOpen = false;
      continue;
    }
    // punctuation: separators keep a list open, others close it
    if (!(CONJ.has(t.t) || t.t === ')' || t.t === ']' || t.t === '-' || t.t === ';'))
      listOpen = false;
    if (t.t === ';') listOpen = false;
  }

  /** Reads a number at token j (with sub-number); records a finding; returns the last token index used. */
  function readCode(j: number, prefixed: boolean, startIdx: number): number | null {
    const num = tokens[j] as Token;
    const value = Number(num.t);
    if (value < 100 || value > 1599) return null;
    // "vitamin E 450 mg", "E 339 mg": amounts, not additives
    const before = word(startIdx - 1);
    if (prefixed && VITAMIN_RE.test(before)) return null;
    const k = j + 1;
    const sep = tok(k);
    if (sep && (sep.t === '.' || sep.t === ',') && sep.s === num.e) {
      const frac = tok(k + 1);
      if (frac && frac.type === 'n' && frac.s === sep.e) return null; // a decimal amount "339,5"
    }
    if (UNIT_RE.test(word(k)) || tok(k)?.t === '%') return null;
    let sub: string | null = null;
    let last = j;
    const a = tok(k);
    if (a && a.t === '(' && ROMAN.has(word(k + 1)) && tok(k + 2)?.t === ')') {
      sub = word(k + 1);
      last = k + 2;
    } else if (a && a.type === 'w' && ROMAN.has(a.t) && a.s - num.e <= 1) {
      // "E450iii", "E 450 i" (a separate roman numeral, not the start of a word)
      const after = tok(k + 1);
      if (!(after && (after.t === '.' || after.t === "'") && tok(k + 2)?.type === 'w')) {
        sub = a.t;
        last = k;
      }
    }
    const family = num.t;
    for (let q = startIdx; q <= last; q++) consumed[q] = 1;
    if (!PHOSPHATE_FAMILIES.has(family)) return last; // another additive: keeps the list going
    const exact = sub ? findByNumber(family, sub) : undefined;
    const entry = exact ?? findByNumber(family);
    if (!entry) return last;
    const label = prefixed
      ? norm.slice((tokens[startIdx] as Token).s, (tokens[last] as Token).e)
      : num.t;
    let how = prefixed ? `number "${label}"` : `number ${num.t} in an additive list`;
    if (sub && !exact) how += `; sub-number (${sub}) is not in the catalogue, read as the family`;
    raws.push({
      entry,
      s: (tokens[startIdx] as Token).s,
      e: (tokens[last] as Token).e,
      how,
      byNumber: true,
    });
    return last;
  }

  // ---- names
  for (let i = 0; hasNames && i < n; i++) {
    if (consumed[i]) continue;
    const t = tokens[i] as Token;
    if (t.type !== 'w') continue;
    const w = t.t;
    const c0 = w.charCodeAt(0);
    // Cheap gate: every name we match contains one of these letters sequences.
    if (!(
      w.includes('phos') ||
      w.includes('fos') ||
      w.includes('osph') ||
      w.includes('ospat') ||
      w.includes('lec') ||
      w.includes('lez') ||
      w.includes('guan') ||
      w.includes('inosin') ||
      w.includes('ribonu') ||
      w.includes('sapp') ||
      w.includes('stpp') ||
      w.includes('shmp') ||
      w.includes('tspp') ||
      w.includes('salp') ||
      w.includes('hosp') ||
      (c0 === 105 && w === 'i')
    ))
      continue;

    const abbr = ABBREVIATIONS.get(w);
    if (abbr) {
      raws.push({
        entry: abbr,
        s: t.s,
        e: t.e,
        how: `abbreviation "${w.toUpperCase()}"`,
        byNumber: false,
      });
      continue;
    }
    // "I+G"
    if (w === 'i' && tok(i + 1)?.t === '+' && word(i + 2) === 'g') {
      raws.push({
        entry: entryOrFamily('635', null) as AdditiveEntry,
        s: t.s,
        e: (tokens[i + 2] as Token).e,
        how: 'name "I+G"',
        byNumber: false,
      });
      i += 2;
      continue;
    }
    if (ACID_COMPOUND_RE.test(w)) {
      raws.push({
        entry: entryOrFamily('338', null) as AdditiveEntry,
        s: t.s,
        e: t.e,
        how: `name "${w}"`,
        byNumber: false,
      });
      continue;
    }
    const acidAdj = ACID_ADJ_RE.exec(w);
    if (acidAdj) {
      let s = t.s;
      let e = t.e;
      let ok = false;
      if (ACID_WORD_RE.test(word(i + 1))) {
        e = (tokens[i + 1] as Token).e;
        ok = true;
      }
      if (ACID_WORD_RE.test(word(i - 1))) {
        s = (tokens[i - 1] as Token).s;
        ok = true;
      } else if (tok(i - 1)?.t === '-' && word(i - 2) === 'ortho') {
        s = (tokens[i - 2] as Token).s;
        if (ACID_WORD_RE.test(word(i - 3))) {
          s = (tokens[i - 3] as Token).s;
          ok = true;
        }
      }
      if (ok) {
        const typo = /ous$|us$/.test(w) || !/phosph|fosf/.test(w);
        raws.push({
          entry: entryOrFamily('338', null) as AdditiveEntry,
          s,
          e,
          how: typo
            ? `name "${norm.slice(s, e)}" (misspelt; read as phosphoric acid)`
            : `name "${norm.slice(s, e)}"`,
          byNumber: false,
        });
        if (ACID_WORD_RE.test(word(i + 1))) i++;
      }
      continue;
    }
    if (LECITHIN_RE.test(w)) {
      raws.push({
        entry: entryOrFamily('322', null) as AdditiveEntry,
        s: t.s,
        e: t.e,
        how: `name "${w}"`,
        byNumber: false,
      });
      continue;
    }
    const glycero = GLYCERO_RE.exec(w);
    if (glycero) {
      const pre = glycero[1] ?? glycero[4] ?? '';
      let cation = pre ? cationOf(pre) : null;
      let s = t.s;
      let e = t.e;
      if (!cation) {
        const left = CATION_NOUN_RE.exec(word(i - 1));
        if (left) {
          cation = cationOf(left[2] as string);
          s = (tokens[i - 1] as Token).s;
        } else if (PREP.has(word(i + 1))) {
          const right = CATION_NOUN_ROMANCE_RE.exec(word(i + 2));
          if (right) {
            cation = cationOf(right[2] as string);
            e = (tokens[i + 2] as Token).e;
          }
        }
      }
      const code = cation === 'Mg' ? 'magnesium glycerophosphate' : 'calcium glycerophosphate';
      raws.push({
        entry: byCodeStrict(code),
        s,
        e,
        how:
          cation === 'Mg' || cation === 'Ca'
            ? `name "${norm.slice(s, e)}"`
            : `name "${norm.slice(s, e)}" (salt not named; read as the calcium salt)`,
        byNumber: false,
      });
      continue;
    }
    const nucleo = NUCLEOTIDE_RE.exec(w);
    if (nucleo) {
      const isAcid =
        /ic|ique|ico|saure|saeure/.test(nucleo[4] ?? '') ||
        ACID_WORD_RE.test(word(i - 1)) ||
        ACID_WORD_RE.test(word(i + 1));
      let cation: Cation | null = nucleo[2] ? cationOf(nucleo[2]) : null;
      let s = t.s;
      let e = t.e;
      if (!cation) {
        const left = CATION_NOUN_RE.exec(word(i - 1));
        const adj = CATION_ADJ_RE.exec(word(i + 1));
        if (left) {
          cation = cationOf(left[2] as string);
          s = (tokens[i - 1] as Token).s;
        } else if (adj) {
          cation = adj[2] ? cationOf(adj[2]) : null;
          e = (tokens[i + 1] as Token).e;
        } else if (PREP.has(word(i + 1))) {
          const right = CATION_NOUN_ROMANCE_RE.exec(word(i + 2));
          if (right) {
            cation = cationOf(right[2] as string);
            e = (tokens[i + 2] as Token).e;
          }
        }
      }
      if (ACID_WORD_RE.test(word(i - 1))) s = (tokens[i - 1] as Token).s;
      if (isAcid && ACID_WORD_RE.test(word(i + 1))) e = (tokens[i + 1] as Token).e;
      const guan = (nucleo[3] as string).startsWith('guan');
      const base = guan ? 626 : 630;
      const offset = isAcid ? 0 : cation === 'K' ? 2 : cation === 'Ca' ? 3 : 1;
      const guess = !isAcid && cation === null;
      raws.push({
        entry: entryOrFamily(String(base + offset), null) as AdditiveEntry,
        s,
        e,
        how: `name "${norm.slice(s, e)}"${guess ? ' (salt not named; read as the disodium salt)' : ''}`,
        byNumber: false,
      });
      continue;
    }
    if (RIBONUCLEOTIDE_RE.test(w)) {
      let s = t.s;
      let e = t.e;
      let calcium = w.startsWith('calcium');
      // "disodium 5'-ribonucleotides", "5'-ribonucleotides de calcium"
      let j = i - 1;
      while (j >= 0 && (tok(j)?.t === '-' || tok(j)?.t === "'" || tok(j)?.t === '5')) j--;
      const left = CATION_NOUN_RE.exec(word(j));
      if (left) {
        calcium = left[2] === 'calcium';
        s = (tokens[j] as Token).s;
      } else if (j < i - 1) {
        s = (tokens[j + 1] as Token).s;
      }
      const adj = CATION_ADJ_RE.exec(word(i + 1));
      if (adj) {
        calcium = adj[2] === 'calc';
        e = (tokens[i + 1] as Token).e;
      } else if (PREP.has(word(i + 1)) && CATION_NOUN_ROMANCE_RE.test(word(i + 2))) {
        calcium = /calc/.test(word(i + 2));
        e = (tokens[i + 2] as Token).e;
      }
      raws.push({
        entry: entryOrFamily(calcium ? '634' : '635', null) as AdditiveEntry,
        s,
        e,
        how: `name "${norm.slice(s, e)}"`,
        byNumber: false,
      });
      continue;
    }
    const phosphatide = PHOSPHATIDE_RE.exec(w);
    if (phosphatide) {
      const ammoniumInWord = w.startsWith('ammonium');
      const leftAmm = /^(ammonium)$/.test(word(i - 1));
      let rightAmm = false;
      let e = t.e;
      if (PREP.has(word(i + 1))) {
        let k = i + 2;
        if (tok(k)?.t === "'") k++;
        if (/^(ammonium|amonio|ammonio)$/.test(word(k))) {
          rightAmm = true;
          e = (tokens[k] as Token).e;
        }
      } else if (
        tok(i + 1)?.t === "'" &&
        PREP.has(word(i - 0)) === false &&
        /^(ammonium|amonio|ammonio)$/.test(word(i + 2))
      ) {
        rightAmm = true;
        e = (tokens[i + 2] as Token).e;
      }
      if (ammoniumInWord || leftAmm || rightAmm) {
        raws.push({
          entry: entryOrFamily('442', null) as AdditiveEntry,
          s: leftAmm ? (tokens[i - 1] as Token).s : t.s,
          e,
          how: 'name "ammonium phosphatides"',
          byNumber: false,
        });
      }
      continue;
    }
    if (STARCH_COMPOUND_RE.test(w)) {
      let family = w.startsWith('hydroxypropyl')
        ? '1442'
        : /^(hydroxypropyl)?mono/.test(w)
          ? '1410'
          : '1412';
      let s = t.s;
      for (const [re, fam] of STARCH_QUALIFIER)
        if (re.test(word(i - 1))) {
          family = fam;
          s = (tokens[i - 1] as Token).s;
        }
      raws.push({
        entry: entryOrFamily(family, null) as AdditiveEntry,
        s,
        e: t.e,
        how: `name "${norm.slice(s, t.e)}"`,
        byNumber: false,
      });
      continue;
    }

    const compound = PHOS_COMPOUND_RE.exec(w);
    const stem = compound ? null : PHOS_STEM_RE.exec(w);
    if (!compound && !stem) {
      if (PHOS_ANY_STEM_RE.test(w) && !NOT_AN_ADDITIVE_STEM_RE.test(w))
        raws.push({
          entry: UNSPECIFIED_PHOSPHATE,
          s: t.s,
          e: t.e,
          how: `stem rule: "${w}" carries a phosphate stem in a language without listed names (unspecified phosphate)`,
          byNumber: false,
        });
      continue;
    }

    // Left context.
    let s = t.s;
    let e = t.e;
    const cations: CationHit[] = [];
    let acid = false;
    let basic = false;
    let hydrogen: number | null = null;
    let starchFamily: string | null = null;
    let starchQualifier: string | null = null;
    let conjunction = false;
    let riboflavin = false;
    let organicEster = false;
    let anion: Anion;

    if (compound) {
      const m = compound[1] ? (MULT[compound[1]] ?? null) : null;
      cations.push({ cation: cationOf(compound[2] as string) as Cation, mult: m, idx: i });
      if (compound[3])
        cations.push({ cation: cationOf(compound[3]) as Cation, mult: null, idx: i });
      if (compound[4]) hydrogen = compound[4].startsWith('di') ? 2 : 1;
      anion = anionOf(compound[5]);
    } else {
      const prefix = (stem as RegExpExecArray)[1];
      if (prefix && /hydrogeno|hidrogeno|idrogeno/.test(prefix)) {
        hydrogen = prefix.startsWith('di') ? 2 : 1;
        anion = 'ortho';
        if (hydrogen === 1 && tok(i - 1)?.t === '-' && word(i - 2) === 'di') {
          // Portuguese "di-hidrogenofosfato"
          hydrogen = 2;
          s = (tokens[i - 2] as Token).s;
        }
      } else {
        anion = anionOf(prefix);
      }
    }

    let j = i - 1;
    let pendingConj = false;
    while (j >= 0 && i - j <= 8) {
      const lt = tokens[j] as Token;
      if (lt.t === '-' || lt.t === "'") {
        j--;
        continue;
      }
      if (lt.t === '5' && (tok(j + 1)?.t === "'" || tok(j - 1)?.type === 'w')) {
        j--;
        continue;
      }
      if (lt.t === ')' && ROMAN.has(word(j - 1)) && tok(j - 2)?.t === '(') {
        // "Eisen(III)-diphosphat", "iron(III) phosphate"
        j -= 3;
        continue;
      }
      if (lt.type !== 'w' && lt.t !== ',' && lt.t !== '/' && lt.t !== '&' && lt.t !== '+') break;
      const lw = lt.t;
      const cn = CATION_NOUN_RE.exec(lw);
      if (cn) {
        let mult = cn[1] ? (MULT[cn[1]] ?? null) : null;
        let at = j;
        // "tri-calcium phosphate", "di-sodium phosphate"
        if (mult === null && tok(j - 1)?.t === '-' && MULT[word(j - 2)] !== undefined) {
          mult = MULT[word(j - 2)] ?? null;
          at = j - 2;
        }
        cations.push({ cation: cationOf(cn[2] as string) as Cation, mult, idx: j });
        if (pendingConj) conjunction = true;
        pendingConj = false;
        s = (tokens[at] as Token).s;
        j = at - 1;
        continue;
      }
      if (lw === 'acid' || lw === 'acidic' || lw === 'saures' || lw === 'saure') {
        acid = true;
        s = lt.s;
        j--;
        continue;
      }
      if (lw === 'basic' || lw === 'basisches' || lw === 'basisch') {
        basic = true;
        s = lt.s;
        j--;
        continue;
      }
      if (lw === 'dihydrogen' || lw === 'hydrogen') {
        hydrogen = lw === 'dihydrogen' ? 2 : 1;
        s = lt.s;
        j--;
        continue;
      }
      const st = STARCH_RE.exec(lw);
      if (st) {
        starchFamily = st[1] === 'mono' ? '1410' : '1412';
        s = lt.s;
        j--;
        continue;
      }
      const q = STARCH_QUALIFIER.find(([re]) => re.test(lw));
      if (q && (starchFamily || STARCH_RE.test(word(j + 1)))) {
        starchQualifier = q[1];
        s = lt.s;
        j--;
        continue;
      }
      if (RIBOFLAVIN_RE.test(lw)) {
        riboflavin = true;
        s = lt.s;
        break;
      }
      if (ORGANIC_ESTER_RE.test(lw)) {
        organicEster = true;
        break;
      }
      if (CONJ.has(lw) && cations.length > 0) {
        // "sodium and/or potassium phosphates", "sodium, potassium phosphates"
        let q = j - 1;
        while (q >= 0 && CONJ.has((tokens[q] as Token).t)) q--;
        if (q >= 0 && CATION_NOUN_RE.test(word(q))) {
          pendingConj = true;
          j = q;
          continue;
        }
      }
      break;
    }

    // Right context (Romance word order): "phosphate disodique", "fosfato de sodio y aluminio".
    let k = i + 1;
    const rightLimit = Math.min(n, i + 10);
    let pendingRightConj = false;
    while (k < rightLimit) {
      const rt = tokens[k] as Token;
      const rw = rt.type === 'w' ? rt.t : '';
      const adj = rw ? CATION_ADJ_RE.exec(rw) : null;
      if (
        adj &&
        (cations.length === 0 ||
          pendingRightConj ||
          cations.every((c) => c.idx < i) === false ||
          true)
      ) {
        const stemText = (adj[2] ?? '').replace(/^s(?=sod)/, '');
        const cat = adj[5] ? 'Fe' : cationOf(stemText);
        if (cat) {
          cations.push({ cation: cat, mult: adj[1] ? (MULT[adj[1]] ?? null) : null, idx: k });
          if (pendingRightConj) conjunction = true;
          pendingRightConj = false;
          e = rt.e;
          k++;
          continue;
        }
      }
      const basicity = /^(mono|di|tri)basic$/.exec(rw);
      if (basicity && cations.length > 0) {
        // pharmacopoeia style: "sodium phosphate, dibasic", "potassium phosphate monobasic"
        const m = MULT[basicity[1] as string] ?? null;
        for (const c of cations) if (c.mult === null) c.mult = m;
        e = rt.e;
        k++;
        continue;
      }
      if (rt.t === ',' && cations.length > 0 && /^(mono|di|tri)basic$/.test(word(k + 1))) {
        k++;
        continue;
      }
      if (rw === 'diacide' || rw === 'diacido') {
        hydrogen = 2;
        e = rt.e;
        k++;
        continue;
      }
      if (rw === 'acide' || rw === 'acido' || rw === 'acida') {
        acid = true;
        e = rt.e;
        k++;
        continue;
      }
      if (rw === 'basique' || rw === 'basico') {
        basic = true;
        e = rt.e;
        k++;
        continue;
      }
      if (rw && PREP.has(rw)) {
        let q = k + 1;
        if (tok(q)?.t === "'") q++;
        const nw = word(q);
        const cn = CATION_NOUN_ROMANCE_RE.exec(nw);
        if (cn) {
          const cat = cationOf(cn[2] as string);
          // "os" (bone) only straight after "d'"/"de"
          if (cat) {
            cations.push({ cation: cat, mult: cn[1] ? (MULT[cn[1]] ?? null) : null, idx: q });
            if (pendingRightConj) conjunction = true;
            pendingRightConj = false;
            e = (tokens[q] as Token).e;
            k = q + 1;
            continue;
          }
        }
        const sw = STARCH_RE.exec(nw);
        if (sw) {
          starchFamily = sw[1] === 'mono' ? '1410' : '1412';
          e = (tokens[q] as Token).e;
          k = q + 1;
          const qual = STARCH_QUALIFIER.find(([re]) => re.test(word(k)));
          if (qual) {
            starchQualifier = qual[1];
            e = (tokens[k] as Token).e;
            k++;
          }
          continue;
        }
        break;
      }
      if (rw && CONJ.has(rw) && cations.length > 0) {
        // "de sodio y aluminio", "di sodio e calcio", "de sodium et de calcium"
        const nw = word(k + 1);
        if (CATION_NOUN_ROMANCE_RE.test(nw) || PREP.has(nw) || CATION_ADJ_RE.test(nw)) {
          pendingRightConj = true;
          if (CATION_NOUN_ROMANCE_RE.test(nw)) {
            const cn = CATION_NOUN_ROMANCE_RE.exec(nw) as RegExpExecArray;
            const cat = cationOf(cn[2] as string);
            if (cat) {
              cations.push({ cation: cat, mult: cn[1] ? (MULT[cn[1]] ?? null) : null, idx: k + 1 });
              conjunction = true;
              pendingRightConj = false;
              e = (tokens[k + 1] as Token).e;
              k += 2;
              continue;
            }
          }
          k++;
          continue;
        }
      }
      break;
    }

    const text = (): string => norm.slice(s, e);
    if (organicEster) {
      // A vitamin ester such as pyridoxal 5'-phosphate: not an additive in the catalogue.
      continue;
    }
    if (riboflavin) {
      raws.push({
        entry: entryOrFamily('101', 'ii') as AdditiveEntry,
        s,
        e,
        how: `name "${text()}"`,
        byNumber: false,
      });
      continue;
    }
    if (starchFamily || starchQualifier) {
      const fam = starchQualifier ?? starchFamily ?? '1412';
      raws.push({
        entry: entryOrFamily(fam, null) as AdditiveEntry,
        s,
        e,
        how: `name "${text()}"`,
        byNumber: false,
      });
      // "phosphate de diamidon phosphaté": the trailing qualifier is part of this finding.
      while (i + 1 < n && (tokens[i + 1] as Token).e <= e) i++;
      continue;
    }
    // Consume the right-hand tokens we used.
    const lastUsed = i;
    while (i + 1 < n && (tokens[i + 1] as Token).e <= e) i++;

    if (cations.length === 0) {
      const entry =
        anion === 'ortho'
          ? hydrogen !== null
            ? UNSPECIFIED_PHOSPHATE
            : UNSPECIFIED_PHOSPHATE
          : (entryOrFamily(
              anion === 'di' ? '450' : anion === 'tri' ? '451' : '452',
              null,
            ) as AdditiveEntry);
      raws.push({ entry, s, e, how: `name "${text()}"`, byNumber: false });
      continue;
    }
    const kinds = new Set(cations.map((c) => c.cation));
    if (kinds.has('Na') && kinds.has('Al')) {
      raws.push({
        entry: saltEntry('Al', null, null, anion, acid, basic),
        s,
        e,
        how: `name "${text()}"`,
        byNumber: false,
      });
      continue;
    }
    if (kinds.has('Fe') || kinds.has('bone')) {
      const c = kinds.has('Fe') ? 'Fe' : 'bone';
      raws.push({
        entry: saltEntry(c, null, null, anion, acid, basic),
        s,
        e,
        how: `name "${text()}"`,
        byNumber: false,
      });
      continue;
    }
    // Sodium calcium polyphosphate is one salt, also when written "de sodio y calcio".
    if (anion === 'poly' && kinds.has('Na') && kinds.has('Ca')) {
      raws.push({
        entry: entryOrFamily('452', 'iii') as AdditiveEntry,
        s,
        e,
        how: `name "${text()}"`,
        byNumber: false,
      });
      continue;
    }
    if (cations.length === 1 || kinds.size === 1) {
      const c = cations[0] as CationHit;
      const mult = cations.find((x) => x.mult !== null)?.mult ?? null;
      raws.push({
        entry: saltEntry(c.cation, mult, hydrogen, anion, acid, basic),
        s,
        e,
        how: `name "${text()}"`,
        byNumber: false,
      });
      continue;
    }
    // "sodium and/or potassium phosphates": one finding per cation, each from its word to the anion.
    const seen = new Set<Cation>();
    const group = i;
    for (const c of [...cations].sort((a, b) => a.idx - b.idx)) {
      if (seen.has(c.cation)) continue;
      seen.add(c.cation);
      const cs = c.idx < lastUsed ? (tokens[c.idx] as Token).s : t.s;
      const ce = c.idx < lastUsed ? t.e : (tokens[c.idx] as Token).e;
      raws.push({
        entry: saltEntry(c.cation, c.mult, hydrogen, anion, acid, basic),
        s: cs,
        e: ce,
        how: `name "${norm.slice(cs, ce)}" (${conjunction ? 'one of several salts named together' : 'mixed salt, read as the salt of each cation'})`,
        byNumber: false,
        group,
      });
    }
  }
  return raws;
}

// ---------------------------------------------------------------------------------------------
// Negations and amounts

const NEGATION_RE =
  /(?:^|[^a-z])(no|without|free from|free of|zero|sans|sin|senza|sem|ohne|kein|keine|keinen|keinerlei|nessun|nessuno|ningun|ninguno|nenhum|aucun|aucune|libre de|exempt de|privo di|priva di|isento de|livre de|frei von)(?=[^a-z]|$)/g;
const AFTER_FREE_RE = /^\s*-?\s*(free|frei|gratuit|libre)\b/;
const AFTER_AMOUNT_RE = /^\s*[:=]?\s*[<>~]?\s*\d+(?:[.,]\d+)?\s*(?:mg|g|mcg|ug|%|mmol)(?![a-z])/;
const CLAUSE_BREAK_RE = /[;.!?:()[\]]/;

/** True when the words just before (same clause) or after a match deny it. */
function denied(norm: string, s: number, e: number): boolean {
  if (AFTER_FREE_RE.test(norm.slice(e, e + 12))) return true;
  if (AFTER_AMOUNT_RE.test(norm.slice(e, e + 16))) return true;
  let from = Math.max(0, s - 60);
  const window = norm.slice(from, s);
  let cut = -1;
  for (let q = window.length - 1; q >= 0; q--)
    if (CLAUSE_BREAK_RE.test(window[q] as string)) {
      cut = q;
      break;
    }
  const clause = window.slice(cut + 1);
  from += cut + 1;
  NEGATION_RE.lastIndex = 0;
  let m: RegExpExecArray | null;
  while ((m = NEGATION_RE.exec(clause)) !== null) {
    const between = clause.slice(m.index + m[0].length);
    // "contains no more than 2% of: salt, sodium phosphate" is an amount, not a denial.
    if (
      /^\s*(more|less)\s+than\b|^\s*(mas|m[aá]s|plus|mehr|pi[uù]|mais)\s+(de|que|di|als)\b/.test(
        between,
      )
    )
      continue;
    // Only a denial right before the additive counts ("no added phosphates", "ohne zugesetzte
    // Phosphate"); a longer gap is more likely a list that merely follows a claim, and missing an
    // additive is worse for the patient than flagging one.
    const words = between.split(/[\s,/]+/).filter(Boolean);
    if (words.length <= 2) return true;
  }
  return false;
}

// ---------------------------------------------------------------------------------------------

function isLanguage(x: string): x is LabelLanguage {
  return (LABEL_LANGUAGES as readonly string[]).includes(x);
}

function displayName(entry: AdditiveEntry, language: string | null | undefined): string {
  const lang = (language ?? '').toLowerCase().slice(0, 2);
  if (lang && lang !== 'en' && isLanguage(lang)) {
    const local = entry.labelNames[lang][0];
    if (local) return local;
  }
  return entry.chemicalName;
}

/**
 * Every phosphorus additive named in an ingredient statement, in text order, with offsets into
 * `text`. `language` (BCP-47, e.g. "es") only picks the display name; all six catalogue
 * languages are recognised in any statement. Never throws.
 */
export function analyzeIngredients(text: string, language?: string | null): IngredientAnalysis {
  try {
    return analyzeIngredientsStrict(text, language);
  } catch {
    // Defensive: a bug here must not take down an import or a request; the scan is then empty.
    return { additives: [] };
  }
}

/** The analyser without the safety net, for tests that must see any internal error. */
export function analyzeIngredientsStrict(
  text: string,
  language?: string | null,
): IngredientAnalysis {
  {
    if (typeof text !== 'string' || text.length === 0 || !QUICK_RE.test(text))
      return { additives: [] };
    const { norm, map } = fold(text);
    const hasNumbers = /\d\d\d/.test(norm);
    const hasNames = NAME_GATE_RE.test(norm);
    if (!hasNumbers && !hasNames) return { additives: [] };
    const tokens = tokenize(norm);
    const raws = scan(norm, tokens, hasNumbers, hasNames)
      .filter((r) => !denied(norm, r.s, r.e))
      .sort((a, b) => a.s - b.s || b.e - a.e);
    // A name and its number side by side ("sodium phosphate (E 339)") are one additive.
    const merged: Raw[] = [];
    for (const r of raws) {
      const prev = merged[merged.length - 1];
      if (prev && r.s < prev.e && !(r.group !== undefined && r.group === prev.group)) {
        if (r.e > prev.e) prev.e = r.e;
        continue; // overlapping: keep the first (the left-most, longest) reading
      }
      if (
        prev &&
        prev.entry.family === r.entry.family &&
        prev.byNumber !== r.byNumber &&
        /^[\s()[\]:=-]*$/.test(norm.slice(prev.e, r.s))
      ) {
        const specific =
          r.entry.level === 'substance' && (prev.entry.level === 'family' || r.byNumber)
            ? r.entry
            : prev.entry;
        prev.entry = specific;
        prev.how = `${prev.how} and ${r.how}`;
        prev.e = r.e;
        prev.byNumber = true;
        continue;
      }
      merged.push({ ...r });
    }
    const additives = merged.map((r): AdditiveFinding => {
      const start = map ? (map[r.s] as number) : r.s;
      const lastIdx = map ? (map[r.e - 1] as number) : r.e - 1;
      const lastCode = text.charCodeAt(lastIdx);
      const end = lastCode >= 0xd800 && lastCode <= 0xdbff ? lastIdx + 2 : lastIdx + 1;
      return {
        code: r.entry.code,
        family: r.entry.family,
        name: displayName(r.entry, language),
        matchedText: text.slice(start, end),
        start,
        end,
        counted: r.entry.counted,
        reason: `found by ${r.how}; ${r.entry.countedReason}`,
      };
    });
    return { additives };
  }
}

/** True when any counted (inorganic) phosphate additive is in the analysis. */
export function hasCountedAdditive(analysis: IngredientAnalysis): boolean {
  return analysis.additives.some((a) => a.counted);
}
