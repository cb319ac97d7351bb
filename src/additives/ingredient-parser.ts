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
/** A phosphate stem in any language (the last-resort rule, `unlistedStemRule`). */
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

/** The folded statement's tokens with bounds-checked access: the rules look left and right. */
class TokenView {
  readonly n: number;
  /** Tokens an additive number already used; the name rules skip them. */
  readonly consumed: Uint8Array;

  constructor(
    readonly norm: string,
    readonly tokens: Token[],
  ) {
    this.n = tokens.length;
    this.consumed = new Uint8Array(tokens.length);
  }

  tok(i: number): Token | undefined {
    return i >= 0 && i < this.n ? this.tokens[i] : undefined;
  }

  at(i: number): Token {
    return this.tokens[i] as Token;
  }

  /** The word at i, or '' when i is out of range or not a word. */
  word(i: number): string {
    const t = this.tok(i);
    return t && t.type === 'w' ? t.t : '';
  }
}

/** Scans the tokens of a folded statement and returns raw findings in norm offsets. */
function scan(norm: string, tokens: Token[], hasNumbers: boolean, hasNames: boolean): Raw[] {
  const v = new TokenView(norm, tokens);
  const raws: Raw[] = [];
  if (hasNumbers) scanNumbers(v, raws);
  if (hasNames) scanNames(v, raws);
  return raws;
}

// ---- numbers: E 339, E-339(ii), E450iii, INS 451, bare numbers in an additive list

function scanNumbers(v: TokenView, raws: Raw[]): void {
  let listOpen = false;
  for (let i = 0; i < v.n; i++) {
    const t = v.at(i);
    if (t.type === 'w') {
      if ((t.t === 'e' || t.t === 'ins') && v.tok(i + 1)) {
        let j = i + 1;
        if (v.tok(j)?.t === '-') j++;
        const num = v.tok(j);
        if (num && num.type === 'n' && num.t.length >= 3 && num.t.length <= 4 && num.s - t.e <= 3) {
          const got = readCode(v, raws, j, true, i);
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
      const next = v.tok(i + 1);
      if (next && (next.t === ':' || next.t === '(' || next.t === '[') && CLASS_WORD_RE.test(t.t)) {
        // "emulsifying salts: 339" / "mineral salts (451, 452)"
        listOpen = true;
        i++;
      }
      continue;
    }
    if (t.type === 'n') {
      if (listOpen && t.t.length >= 3 && t.t.length <= 4) {
        const got = readCode(v, raws, i, false, i);
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
}

/** Reads a number at token j (with sub-number); records a finding; returns the last token index used. */
function readCode(
  v: TokenView,
  raws: Raw[],
  j: number,
  prefixed: boolean,
  startIdx: number,
): number | null {
  const num = v.at(j);
  const value = Number(num.t);
  if (value < 100 || value > 1599) return null;
  // "vitamin E 450 mg", "E 339 mg": amounts, not additives
  if (prefixed && VITAMIN_RE.test(v.word(startIdx - 1))) return null;
  const k = j + 1;
  const sep = v.tok(k);
  if (sep && (sep.t === '.' || sep.t === ',') && sep.s === num.e) {
    const frac = v.tok(k + 1);
    if (frac && frac.type === 'n' && frac.s === sep.e) return null; // a decimal amount "339,5"
  }
  if (UNIT_RE.test(v.word(k)) || v.tok(k)?.t === '%') return null;
  const { sub, last } = readSubNumber(v, j, k);
  const family = num.t;
  for (let q = startIdx; q <= last; q++) v.consumed[q] = 1;
  if (!PHOSPHATE_FAMILIES.has(family)) return last; // another additive: keeps the list going
  const exact = sub ? findByNumber(family, sub) : undefined;
  const entry = exact ?? findByNumber(family);
  if (!entry) return last;
  const label = prefixed ? v.norm.slice(v.at(startIdx).s, v.at(last).e) : num.t;
  let how = prefixed ? `number "${label}"` : `number ${num.t} in an additive list`;
  if (sub && !exact) how += `; sub-number (${sub}) is not in the catalogue, read as the family`;
  raws.push({ entry, s: v.at(startIdx).s, e: v.at(last).e, how, byNumber: true });
  return last;
}

/** A roman sub-number after the number at j ("(ii)", "iii"), with the last token it used. */
function readSubNumber(v: TokenView, j: number, k: number): { sub: string | null; last: number } {
  const num = v.at(j);
  const a = v.tok(k);
  if (a && a.t === '(' && ROMAN.has(v.word(k + 1)) && v.tok(k + 2)?.t === ')') {
    return { sub: v.word(k + 1), last: k + 2 };
  }
  if (a && a.type === 'w' && ROMAN.has(a.t) && a.s - num.e <= 1) {
    // "E450iii", "E 450 i" (a separate roman numeral, not the start of a word)
    const after = v.tok(k + 1);
    if (!(after && (after.t === '.' || after.t === "'") && v.tok(k + 2)?.type === 'w')) {
      return { sub: a.t, last: k };
    }
  }
  return { sub: null, last: j };
}

// ---- names: a table of rules tried in order on each word that may name a phosphate

/** What a name rule read: its findings (maybe none) and the last token index the phrase used. */
interface NameMatch {
  raws: Raw[];
  last: number;
}

/** Reads the phrase around word i, or returns null when the word is not of the rule's kind. */
type NameRule = (v: TokenView, i: number, w: string) => NameMatch | null;

function nameRaw(entry: AdditiveEntry, s: number, e: number, how: string): Raw {
  return { entry, s, e, how, byNumber: false };
}

function family(code: string): AdditiveEntry {
  return entryOrFamily(code, null) as AdditiveEntry;
}

/** Cheap gate: every name the rules match contains one of these letter sequences. */
const NAME_GATE = [
  'phos',
  'fos',
  'osph',
  'ospat',
  'lec',
  'lez',
  'guan',
  'inosin',
  'ribonu',
  'sapp',
  'stpp',
  'shmp',
  'tspp',
  'salp',
  'hosp',
];

function mayNameAdditive(w: string): boolean {
  return w === 'i' || NAME_GATE.some((g) => w.includes(g));
}

function scanNames(v: TokenView, raws: Raw[]): void {
  for (let i = 0; i < v.n; i++) {
    if (v.consumed[i]) continue;
    const t = v.at(i);
    if (t.type !== 'w' || !mayNameAdditive(t.t)) continue;
    for (const rule of NAME_RULES) {
      const m = rule(v, i, t.t);
      if (!m) continue;
      raws.push(...m.raws);
      i = m.last;
      break;
    }
  }
}

const abbreviationRule: NameRule = (v, i, w) => {
  const abbr = ABBREVIATIONS.get(w);
  if (!abbr) return null;
  const t = v.at(i);
  return { raws: [nameRaw(abbr, t.s, t.e, `abbreviation "${w.toUpperCase()}"`)], last: i };
};

/** "I+G" (disodium 5'-ribonucleotides). */
const iPlusGRule: NameRule = (v, i, w) => {
  if (!(w === 'i' && v.tok(i + 1)?.t === '+' && v.word(i + 2) === 'g')) return null;
  return { raws: [nameRaw(family('635'), v.at(i).s, v.at(i + 2).e, 'name "I+G"')], last: i + 2 };
};

/** One-word phosphoric acid ("orthophosphoric"-style compounds). */
const acidCompoundRule: NameRule = (v, i, w) => {
  if (!ACID_COMPOUND_RE.test(w)) return null;
  const t = v.at(i);
  return { raws: [nameRaw(family('338'), t.s, t.e, `name "${w}"`)], last: i };
};

/** "phosphoric acid", "acide phosphorique", "ácido orto-fosfórico", misspellings. */
const acidAdjectiveRule: NameRule = (v, i, w) => {
  if (!ACID_ADJ_RE.test(w)) return null;
  const t = v.at(i);
  let s = t.s;
  let e = t.e;
  let ok = false;
  if (ACID_WORD_RE.test(v.word(i + 1))) {
    e = v.at(i + 1).e;
    ok = true;
  }
  if (ACID_WORD_RE.test(v.word(i - 1))) {
    s = v.at(i - 1).s;
    ok = true;
  } else if (v.tok(i - 1)?.t === '-' && v.word(i - 2) === 'ortho') {
    s = v.at(i - 2).s;
    if (ACID_WORD_RE.test(v.word(i - 3))) {
      s = v.at(i - 3).s;
      ok = true;
    }
  }
  // The adjective alone names nothing; it still ends the search for this word.
  if (!ok) return { raws: [], last: i };
  const typo = /ous$|us$/.test(w) || !/phosph|fosf/.test(w);
  const text = v.norm.slice(s, e);
  const how = typo ? `name "${text}" (misspelt; read as phosphoric acid)` : `name "${text}"`;
  const last = ACID_WORD_RE.test(v.word(i + 1)) ? i + 1 : i;
  return { raws: [nameRaw(family('338'), s, e, how)], last };
};

const lecithinRule: NameRule = (v, i, w) => {
  if (!LECITHIN_RE.test(w)) return null;
  const t = v.at(i);
  return { raws: [nameRaw(family('322'), t.s, t.e, `name "${w}"`)], last: i };
};

/** A cation named as a noun just left ("calcium glycerophosphate") or after a preposition. */
function cationAround(v: TokenView, i: number): { cation: Cation | null; s: number; e: number } {
  const t = v.at(i);
  const left = CATION_NOUN_RE.exec(v.word(i - 1));
  if (left) return { cation: cationOf(left[2] as string), s: v.at(i - 1).s, e: t.e };
  if (PREP.has(v.word(i + 1))) {
    const right = CATION_NOUN_ROMANCE_RE.exec(v.word(i + 2));
    if (right) return { cation: cationOf(right[2] as string), s: t.s, e: v.at(i + 2).e };
  }
  return { cation: null, s: t.s, e: t.e };
}

const glycerophosphateRule: NameRule = (v, i, w) => {
  const glycero = GLYCERO_RE.exec(w);
  if (!glycero) return null;
  const pre = glycero[1] ?? glycero[4] ?? '';
  const inWord = pre ? cationOf(pre) : null;
  const t = v.at(i);
  const { cation, s, e } = inWord ? { cation: inWord, s: t.s, e: t.e } : cationAround(v, i);
  const code = cation === 'Mg' ? 'magnesium glycerophosphate' : 'calcium glycerophosphate';
  const text = v.norm.slice(s, e);
  const how =
    cation === 'Mg' || cation === 'Ca'
      ? `name "${text}"`
      : `name "${text}" (salt not named; read as the calcium salt)`;
  return { raws: [nameRaw(byCodeStrict(code), s, e, how)], last: i };
};

/** Guanylates and inosinates (E 626-633): the acid or its sodium, potassium or calcium salt. */
const nucleotideRule: NameRule = (v, i, w) => {
  const nucleo = NUCLEOTIDE_RE.exec(w);
  if (!nucleo) return null;
  const isAcid =
    /ic|ique|ico|saure|saeure/.test(nucleo[4] ?? '') ||
    ACID_WORD_RE.test(v.word(i - 1)) ||
    ACID_WORD_RE.test(v.word(i + 1));
  let cation: Cation | null = nucleo[2] ? cationOf(nucleo[2]) : null;
  const t = v.at(i);
  let s = t.s;
  let e = t.e;
  if (!cation) {
    const left = CATION_NOUN_RE.exec(v.word(i - 1));
    const adj = CATION_ADJ_RE.exec(v.word(i + 1));
    if (left) {
      cation = cationOf(left[2] as string);
      s = v.at(i - 1).s;
    } else if (adj) {
      cation = adj[2] ? cationOf(adj[2]) : null;
      e = v.at(i + 1).e;
    } else if (PREP.has(v.word(i + 1))) {
      const right = CATION_NOUN_ROMANCE_RE.exec(v.word(i + 2));
      if (right) {
        cation = cationOf(right[2] as string);
        e = v.at(i + 2).e;
      }
    }
  }
  if (ACID_WORD_RE.test(v.word(i - 1))) s = v.at(i - 1).s;
  if (isAcid && ACID_WORD_RE.test(v.word(i + 1))) e = v.at(i + 1).e;
  const base = (nucleo[3] as string).startsWith('guan') ? 626 : 630;
  const offset = isAcid ? 0 : cation === 'K' ? 2 : cation === 'Ca' ? 3 : 1;
  const guess = !isAcid && cation === null;
  const how = `name "${v.norm.slice(s, e)}"${guess ? ' (salt not named; read as the disodium salt)' : ''}`;
  return { raws: [nameRaw(family(String(base + offset)), s, e, how)], last: i };
};

/** "disodium 5'-ribonucleotides", "5'-ribonucleotides de calcium" (E 634, E 635). */
const ribonucleotideRule: NameRule = (v, i, w) => {
  if (!RIBONUCLEOTIDE_RE.test(w)) return null;
  const t = v.at(i);
  let s = t.s;
  let e = t.e;
  let calcium = w.startsWith('calcium');
  let j = i - 1;
  while (j >= 0 && (v.tok(j)?.t === '-' || v.tok(j)?.t === "'" || v.tok(j)?.t === '5')) j--;
  const left = CATION_NOUN_RE.exec(v.word(j));
  if (left) {
    calcium = left[2] === 'calcium';
    s = v.at(j).s;
  } else if (j < i - 1) {
    s = v.at(j + 1).s;
  }
  const adj = CATION_ADJ_RE.exec(v.word(i + 1));
  if (adj) {
    calcium = adj[2] === 'calc';
    e = v.at(i + 1).e;
  } else if (PREP.has(v.word(i + 1)) && CATION_NOUN_ROMANCE_RE.test(v.word(i + 2))) {
    calcium = /calc/.test(v.word(i + 2));
    e = v.at(i + 2).e;
  }
  const how = `name "${v.norm.slice(s, e)}"`;
  return { raws: [nameRaw(family(calcium ? '634' : '635'), s, e, how)], last: i };
};

const AMMONIUM_WORD_RE = /^(ammonium|amonio|ammonio)$/;

/** Ammonium phosphatides (E 442); other phosphatides are not additives and end the search. */
const phosphatideRule: NameRule = (v, i, w) => {
  if (!PHOSPHATIDE_RE.test(w)) return null;
  const t = v.at(i);
  const leftAmm = /^(ammonium)$/.test(v.word(i - 1));
  let rightAmm = false;
  let e = t.e;
  if (PREP.has(v.word(i + 1))) {
    let k = i + 2;
    if (v.tok(k)?.t === "'") k++;
    if (AMMONIUM_WORD_RE.test(v.word(k))) {
      rightAmm = true;
      e = v.at(k).e;
    }
  } else if (v.tok(i + 1)?.t === "'" && AMMONIUM_WORD_RE.test(v.word(i + 2))) {
    rightAmm = true;
    e = v.at(i + 2).e;
  }
  if (!(w.startsWith('ammonium') || leftAmm || rightAmm)) return { raws: [], last: i };
  const s = leftAmm ? v.at(i - 1).s : t.s;
  return { raws: [nameRaw(family('442'), s, e, 'name "ammonium phosphatides"')], last: i };
};

/** One-word modified starches ("distarchphosphate", "hydroxypropyldistärkephosphat"). */
const starchCompoundRule: NameRule = (v, i, w) => {
  if (!STARCH_COMPOUND_RE.test(w)) return null;
  let fam = w.startsWith('hydroxypropyl')
    ? '1442'
    : /^(hydroxypropyl)?mono/.test(w)
      ? '1410'
      : '1412';
  const t = v.at(i);
  let s = t.s;
  for (const [re, qualified] of STARCH_QUALIFIER)
    if (re.test(v.word(i - 1))) {
      fam = qualified;
      s = v.at(i - 1).s;
    }
  return { raws: [nameRaw(family(fam), s, t.e, `name "${v.norm.slice(s, t.e)}"`)], last: i };
};

/** What the words around a phosphate name say: cations, acidity, starch, other esters. */
interface SaltPhrase {
  s: number;
  e: number;
  cations: CationHit[];
  acid: boolean;
  basic: boolean;
  hydrogen: number | null;
  starchFamily: string | null;
  starchQualifier: string | null;
  conjunction: boolean;
  riboflavin: boolean;
  organicEster: boolean;
  anion: Anion;
}

/** Phosphate salts and the bare word "phosphate", in the six label languages' word orders. */
const phosphateSaltRule: NameRule = (v, i, w) => {
  const compound = PHOS_COMPOUND_RE.exec(w);
  const stem = compound ? null : PHOS_STEM_RE.exec(w);
  if (!compound && !stem) return null;
  const p = saltPhraseFromWord(v, i, compound, stem);
  readLeftContext(v, i, p);
  readRightContext(v, i, p);
  return saltFindings(v, i, p);
};

function saltPhraseFromWord(
  v: TokenView,
  i: number,
  compound: RegExpExecArray | null,
  stem: RegExpExecArray | null,
): SaltPhrase {
  const t = v.at(i);
  const p: SaltPhrase = {
    s: t.s,
    e: t.e,
    cations: [],
    acid: false,
    basic: false,
    hydrogen: null,
    starchFamily: null,
    starchQualifier: null,
    conjunction: false,
    riboflavin: false,
    organicEster: false,
    anion: 'ortho',
  };
  if (compound) {
    const m = compound[1] ? (MULT[compound[1]] ?? null) : null;
    p.cations.push({ cation: cationOf(compound[2] as string) as Cation, mult: m, idx: i });
    if (compound[3])
      p.cations.push({ cation: cationOf(compound[3]) as Cation, mult: null, idx: i });
    if (compound[4]) p.hydrogen = compound[4].startsWith('di') ? 2 : 1;
    p.anion = anionOf(compound[5]);
    return p;
  }
  const prefix = (stem as RegExpExecArray)[1];
  if (prefix && /hydrogeno|hidrogeno|idrogeno/.test(prefix)) {
    p.hydrogen = prefix.startsWith('di') ? 2 : 1;
    p.anion = 'ortho';
    if (p.hydrogen === 1 && v.tok(i - 1)?.t === '-' && v.word(i - 2) === 'di') {
      // Portuguese "di-hidrogenofosfato"
      p.hydrogen = 2;
      p.s = v.at(i - 2).s;
    }
  } else {
    p.anion = anionOf(prefix);
  }
  return p;
}

/** Words left of the phosphate (English and German order): "tri-calcium", "acid", "distarch". */
function readLeftContext(v: TokenView, i: number, p: SaltPhrase): void {
  let j = i - 1;
  let pendingConj = false;
  while (j >= 0 && i - j <= 8) {
    const lt = v.at(j);
    if (lt.t === '-' || lt.t === "'") {
      j--;
      continue;
    }
    if (lt.t === '5' && (v.tok(j + 1)?.t === "'" || v.tok(j - 1)?.type === 'w')) {
      j--;
      continue;
    }
    if (lt.t === ')' && ROMAN.has(v.word(j - 1)) && v.tok(j - 2)?.t === '(') {
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
      if (mult === null && v.tok(j - 1)?.t === '-' && MULT[v.word(j - 2)] !== undefined) {
        mult = MULT[v.word(j - 2)] ?? null;
        at = j - 2;
      }
      p.cations.push({ cation: cationOf(cn[2] as string) as Cation, mult, idx: j });
      if (pendingConj) p.conjunction = true;
      pendingConj = false;
      p.s = v.at(at).s;
      j = at - 1;
      continue;
    }
    const marker = leftMarker(v, j, lw, p);
    if (marker === 'next') {
      p.s = lt.s;
      j--;
      continue;
    }
    if (marker === 'stop') break;
    if (CONJ.has(lw) && p.cations.length > 0) {
      // "sodium and/or potassium phosphates", "sodium, potassium phosphates"
      let q = j - 1;
      while (q >= 0 && CONJ.has(v.at(q).t)) q--;
      if (q >= 0 && CATION_NOUN_RE.test(v.word(q))) {
        pendingConj = true;
        j = q;
        continue;
      }
    }
    break;
  }
}

/**
 * One left-hand word that qualifies the phrase: records it and answers 'next' (keep reading
 * left), 'stop' (a word that ends the phrase: riboflavin, an organic ester) or null (not one).
 */
function leftMarker(v: TokenView, j: number, lw: string, p: SaltPhrase): 'next' | 'stop' | null {
  if (lw === 'acid' || lw === 'acidic' || lw === 'saures' || lw === 'saure') {
    p.acid = true;
    return 'next';
  }
  if (lw === 'basic' || lw === 'basisches' || lw === 'basisch') {
    p.basic = true;
    return 'next';
  }
  if (lw === 'dihydrogen' || lw === 'hydrogen') {
    p.hydrogen = lw === 'dihydrogen' ? 2 : 1;
    return 'next';
  }
  const st = STARCH_RE.exec(lw);
  if (st) {
    p.starchFamily = st[1] === 'mono' ? '1410' : '1412';
    return 'next';
  }
  const q = STARCH_QUALIFIER.find(([re]) => re.test(lw));
  if (q && (p.starchFamily || STARCH_RE.test(v.word(j + 1)))) {
    p.starchQualifier = q[1];
    return 'next';
  }
  if (RIBOFLAVIN_RE.test(lw)) {
    p.riboflavin = true;
    p.s = v.at(j).s;
    return 'stop';
  }
  if (ORGANIC_ESTER_RE.test(lw)) {
    p.organicEster = true;
    return 'stop';
  }
  return null;
}

/** Words right of the phosphate (Romance order): "phosphate disodique", "fosfato de sodio y aluminio". */
function readRightContext(v: TokenView, i: number, p: SaltPhrase): void {
  let k = i + 1;
  const rightLimit = Math.min(v.n, i + 10);
  let pendingRightConj = false;
  const addCation = (cation: Cation, mult: number | null, idx: number) => {
    p.cations.push({ cation, mult, idx });
    if (pendingRightConj) p.conjunction = true;
    pendingRightConj = false;
    p.e = v.at(idx).e;
  };
  while (k < rightLimit) {
    const rt = v.at(k);
    const rw = rt.type === 'w' ? rt.t : '';
    const adj = rw ? CATION_ADJ_RE.exec(rw) : null;
    if (adj) {
      const stemText = (adj[2] ?? '').replace(/^s(?=sod)/, '');
      const cat = adj[5] ? 'Fe' : cationOf(stemText);
      if (cat) {
        addCation(cat, adj[1] ? (MULT[adj[1]] ?? null) : null, k);
        k++;
        continue;
      }
    }
    const basicity = /^(mono|di|tri)basic$/.exec(rw);
    if (basicity && p.cations.length > 0) {
      // pharmacopoeia style: "sodium phosphate, dibasic", "potassium phosphate monobasic"
      const m = MULT[basicity[1] as string] ?? null;
      for (const c of p.cations) if (c.mult === null) c.mult = m;
      p.e = rt.e;
      k++;
      continue;
    }
    if (rt.t === ',' && p.cations.length > 0 && /^(mono|di|tri)basic$/.test(v.word(k + 1))) {
      k++;
      continue;
    }
    if (rightAcidity(rw, p)) {
      p.e = rt.e;
      k++;
      continue;
    }
    if (rw && PREP.has(rw)) {
      const after = readAfterPreposition(v, k, p, addCation);
      if (after === null) break;
      k = after;
      continue;
    }
    if (rw && CONJ.has(rw) && p.cations.length > 0) {
      // "de sodio y aluminio", "di sodio e calcio", "de sodium et de calcium"
      const nw = v.word(k + 1);
      if (CATION_NOUN_ROMANCE_RE.test(nw) || PREP.has(nw) || CATION_ADJ_RE.test(nw)) {
        pendingRightConj = true;
        const cn = CATION_NOUN_ROMANCE_RE.exec(nw);
        const cat = cn ? cationOf(cn[2] as string) : null;
        if (cn && cat) {
          addCation(cat, cn[1] ? (MULT[cn[1]] ?? null) : null, k + 1);
          p.conjunction = true;
          k += 2;
          continue;
        }
        k++;
        continue;
      }
    }
    break;
  }
}

/** "diacide", "acide", "basique" after the anion: records it; false when the word is none. */
function rightAcidity(rw: string, p: SaltPhrase): boolean {
  if (rw === 'diacide' || rw === 'diacido') p.hydrogen = 2;
  else if (rw === 'acide' || rw === 'acido' || rw === 'acida') p.acid = true;
  else if (rw === 'basique' || rw === 'basico') p.basic = true;
  else return false;
  return true;
}

/**
 * After "de"/"di"/"d'": a cation ("de sodio") or a starch ("de diamidon phosphaté"). Returns the
 * next token index to read, or null when the preposition starts something else.
 */
function readAfterPreposition(
  v: TokenView,
  k: number,
  p: SaltPhrase,
  addCation: (cation: Cation, mult: number | null, idx: number) => void,
): number | null {
  let q = k + 1;
  if (v.tok(q)?.t === "'") q++;
  const nw = v.word(q);
  const cn = CATION_NOUN_ROMANCE_RE.exec(nw);
  // "os" (bone) only straight after "d'"/"de"
  const cat = cn ? cationOf(cn[2] as string) : null;
  if (cn && cat) {
    addCation(cat, cn[1] ? (MULT[cn[1]] ?? null) : null, q);
    return q + 1;
  }
  const sw = STARCH_RE.exec(nw);
  if (!sw) return null;
  p.starchFamily = sw[1] === 'mono' ? '1410' : '1412';
  p.e = v.at(q).e;
  let next = q + 1;
  const qual = STARCH_QUALIFIER.find(([re]) => re.test(v.word(next)));
  if (qual) {
    p.starchQualifier = qual[1];
    p.e = v.at(next).e;
    next++;
  }
  return next;
}

/** Turns a read phrase into findings: one salt, a mixed salt, or one finding per named cation. */
function saltFindings(v: TokenView, i: number, p: SaltPhrase): NameMatch {
  const { s, e, cations, hydrogen, anion, acid, basic } = p;
  const text = v.norm.slice(s, e);
  const one = (entry: AdditiveEntry, last: number): NameMatch => ({
    raws: [nameRaw(entry, s, e, `name "${text}"`)],
    last,
  });
  // A vitamin ester such as pyridoxal 5'-phosphate: not an additive in the catalogue.
  if (p.organicEster) return { raws: [], last: i };
  if (p.riboflavin) return one(entryOrFamily('101', 'ii') as AdditiveEntry, i);
  // Consume the right-hand tokens used ("phosphate de diamidon phosphaté": the trailing
  // qualifier is part of this finding).
  let last = i;
  while (last + 1 < v.n && v.at(last + 1).e <= e) last++;
  if (p.starchFamily || p.starchQualifier)
    return one(family(p.starchQualifier ?? p.starchFamily ?? '1412'), last);
  if (cations.length === 0) {
    const code = anion === 'di' ? '450' : anion === 'tri' ? '451' : '452';
    return one(anion === 'ortho' ? UNSPECIFIED_PHOSPHATE : family(code), last);
  }
  const kinds = new Set(cations.map((c) => c.cation));
  if (kinds.has('Na') && kinds.has('Al'))
    return one(saltEntry('Al', null, null, anion, acid, basic), last);
  if (kinds.has('Fe') || kinds.has('bone')) {
    const c = kinds.has('Fe') ? 'Fe' : 'bone';
    return one(saltEntry(c, null, null, anion, acid, basic), last);
  }
  // Sodium calcium polyphosphate is one salt, also when written "de sodio y calcio".
  if (anion === 'poly' && kinds.has('Na') && kinds.has('Ca'))
    return one(entryOrFamily('452', 'iii') as AdditiveEntry, last);
  if (cations.length === 1 || kinds.size === 1) {
    const c = cations[0] as CationHit;
    const mult = cations.find((x) => x.mult !== null)?.mult ?? null;
    return one(saltEntry(c.cation, mult, hydrogen, anion, acid, basic), last);
  }
  return { raws: perCationFindings(v, i, last, p), last };
}

/** "sodium and/or potassium phosphates": one finding per cation, each from its word to the anion. */
function perCationFindings(v: TokenView, i: number, last: number, p: SaltPhrase): Raw[] {
  const t = v.at(i);
  const raws: Raw[] = [];
  const seen = new Set<Cation>();
  for (const c of [...p.cations].sort((a, b) => a.idx - b.idx)) {
    if (seen.has(c.cation)) continue;
    seen.add(c.cation);
    const cs = c.idx < i ? v.at(c.idx).s : t.s;
    const ce = c.idx < i ? t.e : v.at(c.idx).e;
    const why = p.conjunction
      ? 'one of several salts named together'
      : 'mixed salt, read as the salt of each cation';
    raws.push({
      ...nameRaw(
        saltEntry(c.cation, c.mult, p.hydrogen, p.anion, p.acid, p.basic),
        cs,
        ce,
        `name "${v.norm.slice(cs, ce)}" (${why})`,
      ),
      group: last,
    });
  }
  return raws;
}

/**
 * Last resort for languages without listed names (Polish "fosforany", Swedish "difosfater",
 * Finnish "fosfaatti", Hungarian "foszfatok"): a word with a phosphate stem that no rule above
 * read is reported as an unspecified phosphate, so it is never silently missed.
 */
const unlistedStemRule: NameRule = (v, i, w) => {
  if (!PHOS_ANY_STEM_RE.test(w) || NOT_AN_ADDITIVE_STEM_RE.test(w)) return { raws: [], last: i };
  const t = v.at(i);
  const how = `stem rule: "${w}" carries a phosphate stem in a language without listed names (unspecified phosphate)`;
  return { raws: [nameRaw(UNSPECIFIED_PHOSPHATE, t.s, t.e, how)], last: i };
};

/** The name rules, in the order they are tried on a word (the first that reads it wins). */
const NAME_RULES: readonly NameRule[] = [
  abbreviationRule,
  iPlusGRule,
  acidCompoundRule,
  acidAdjectiveRule,
  lecithinRule,
  glycerophosphateRule,
  nucleotideRule,
  ribonucleotideRule,
  phosphatideRule,
  starchCompoundRule,
  phosphateSaltRule,
  unlistedStemRule,
];

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
