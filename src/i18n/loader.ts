import { projectPath } from '../paths.js';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { IntlMessageFormat } from 'intl-messageformat';
import { AppError } from '../errors.js';
import { catalogueFileSchema, type CatalogueProblem } from './catalogue.js';
import { MessageBundle, messageArguments, type Catalogue } from './messages.js';

/** Where the catalogue files live: `templates/locales/` in the checkout. */
export const DEFAULT_LOCALES_DIR = projectPath('templates', 'locales');

/** The reference language: every other catalogue is checked against its keys. */
export const REFERENCE_LANGUAGE = 'en';

export interface CatalogueSet {
  catalogues: ReadonlyMap<string, Catalogue>;
  problems: CatalogueProblem[];
}

interface Parsed {
  file: string;
  data: ReturnType<typeof catalogueFileSchema.parse>;
}

/**
 * Reads and validates every `*.json` catalogue in a folder. A file with any problem is left out
 * and each problem is reported with its file and key: bad JSON (with the parser's position), a
 * meta field, an ICU syntax error, a key English does not have, or an argument English does not
 * pass. A missing string is not a problem here; it shows as an incomplete language.
 */
export function loadCatalogues(dir: string = DEFAULT_LOCALES_DIR): CatalogueSet {
  const problems: CatalogueProblem[] = [];
  const parsed: Parsed[] = [];
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.json'))
    .sort();
  for (const file of files) {
    let raw: unknown;
    try {
      raw = JSON.parse(readFileSync(join(dir, file), 'utf8'));
    } catch (err) {
      problems.push({ file, key: null, message: `not valid JSON: ${(err as Error).message}` });
      continue;
    }
    const result = catalogueFileSchema.safeParse(raw);
    if (!result.success) {
      for (const issue of result.error.issues) {
        problems.push({ file, key: issue.path.join('.') || null, message: issue.message });
      }
      continue;
    }
    const expected = `${result.data.meta.language}.json`;
    if (file !== expected) {
      problems.push({
        file,
        key: 'meta.language',
        message: `language ${result.data.meta.language} must live in ${expected}`,
      });
      continue;
    }
    parsed.push({ file, data: result.data });
  }

  const compiled = new Map<string, Catalogue>();
  const compile = (p: Parsed, reference: Catalogue | null): Catalogue | null => {
    let ok = true;
    const messages = new Map<string, IntlMessageFormat>();
    const patterns = new Map<string, string>();
    try {
      new Intl.NumberFormat(p.data.meta.locale);
    } catch {
      problems.push({
        file: p.file,
        key: 'meta.locale',
        message: `unknown locale ${p.data.meta.locale}`,
      });
      return null;
    }
    for (const [key, pattern] of Object.entries(p.data.messages)) {
      let mf: IntlMessageFormat;
      try {
        mf = new IntlMessageFormat(pattern, p.data.meta.locale);
      } catch (err) {
        problems.push({
          file: p.file,
          key,
          message: `ICU message syntax error ${(err as Error).message}`,
        });
        ok = false;
        continue;
      }
      if (reference) {
        const en = reference.messages.get(key);
        if (!en) {
          problems.push({
            file: p.file,
            key,
            message: `not a key of ${REFERENCE_LANGUAGE}.json (misspelt?)`,
          });
          ok = false;
          continue;
        }
        const allowed = messageArguments(en.getAst());
        for (const arg of messageArguments(mf.getAst())) {
          if (!allowed.has(arg)) {
            problems.push({
              file: p.file,
              key,
              message: `uses {${arg}}, which ${REFERENCE_LANGUAGE}.json does not pass (allowed: ${[...allowed].join(', ') || 'none'})`,
            });
            ok = false;
          }
        }
      }
      messages.set(key, mf);
      patterns.set(key, pattern);
    }
    return ok ? { file: p.file, meta: p.data.meta, messages, patterns } : null;
  };

  const enParsed = parsed.find((p) => p.data.meta.language === REFERENCE_LANGUAGE);
  const en = enParsed ? compile(enParsed, null) : null;
  if (!en) {
    problems.push({
      file: `${REFERENCE_LANGUAGE}.json`,
      key: null,
      message: 'the English reference catalogue is missing or invalid; no handout can be made',
    });
    return { catalogues: compiled, problems };
  }
  compiled.set(REFERENCE_LANGUAGE, en);
  for (const p of parsed) {
    if (p === enParsed) continue;
    const c = compile(p, en);
    if (c) compiled.set(c.meta.language, c);
  }
  return { catalogues: compiled, problems };
}

/** The catalogues of a folder, or an error that lists every problem with file and key. */
export function loadCataloguesOrThrow(dir: string = DEFAULT_LOCALES_DIR): Languages {
  const set = loadCatalogues(dir);
  if (set.problems.length > 0) {
    const lines = set.problems.map((p) => `${p.file}${p.key ? ` key ${p.key}` : ''}: ${p.message}`);
    throw new AppError(
      'PHL_I18N_CATALOGUE_INVALID',
      500,
      `message catalogues in ${dir} have problems:\n  ${lines.join('\n  ')}`,
      set.problems,
    );
  }
  return new Languages(set.catalogues);
}

/** The loaded languages, and how a patient's preferred language maps onto one of them. */
export class Languages {
  constructor(readonly catalogues: ReadonlyMap<string, Catalogue>) {}

  list(): string[] {
    return [...this.catalogues.keys()].sort();
  }

  /**
   * The catalogue language for a BCP-47 tag: exact match, then Chinese variants to zh-Hans
   * (zh, zh-CN, zh-SG), Filipino to Tagalog, then the base language (es-MX to es); null if none.
   */
  resolve(tag: string | null | undefined): string | null {
    if (!tag) return null;
    const lower = new Map([...this.catalogues.keys()].map((k) => [k.toLowerCase(), k]));
    const t = tag.trim().replaceAll('_', '-').toLowerCase();
    const exact = lower.get(t);
    if (exact) return exact;
    const base = t.split('-')[0] ?? t;
    if (base === 'zh' && !/-(hant|tw|hk|mo)\b/.test(t)) {
      const zh = lower.get('zh-hans') ?? lower.get('zh');
      if (zh) return zh;
    }
    if (base === 'fil') return lower.get('tl') ?? null;
    return lower.get(base) ?? null;
  }

  bundle(language: string): MessageBundle {
    const c = this.catalogues.get(language);
    const en = this.catalogues.get(REFERENCE_LANGUAGE);
    if (!c || !en) throw new Error(`no catalogue for ${language}`);
    return new MessageBundle(c, en);
  }
}
