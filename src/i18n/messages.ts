import { IntlMessageFormat } from 'intl-messageformat';
import type { CatalogueMeta, LanguageStatus } from './catalogue.js';

export type MessageValues = Record<string, string | number>;

/** A validated catalogue with its messages compiled once. */
export interface Catalogue {
  file: string;
  meta: CatalogueMeta;
  messages: ReadonlyMap<string, IntlMessageFormat>;
  /** The raw ICU pattern of each message (the HTML view and tests read these). */
  patterns: ReadonlyMap<string, string>;
}

/** One resolved message: its text and whether English stood in for a missing string. */
export interface ResolvedMessage {
  text: string;
  fallback: boolean;
}

/**
 * The strings of one language with English behind it. `format` never invents text: a key the
 * language lacks is formatted from English and flagged `fallback: true`, and a key English lacks
 * is a programming error.
 */
export class MessageBundle {
  constructor(
    readonly catalogue: Catalogue,
    readonly english: Catalogue,
  ) {}

  get language(): string {
    return this.catalogue.meta.language;
  }

  get locale(): string {
    return this.catalogue.meta.locale;
  }

  /** Keys of the English reference catalogue this language does not have, sorted. */
  missingKeys(): string[] {
    return [...this.english.messages.keys()].filter((k) => !this.catalogue.messages.has(k)).sort();
  }

  format(key: string, values: MessageValues = {}): ResolvedMessage {
    const own = this.catalogue.messages.get(key);
    if (own) return { text: String(own.format(values)), fallback: false };
    const en = this.english.messages.get(key);
    if (!en) throw new Error(`message key ${key} is not in the English catalogue`);
    return { text: String(en.format(values)), fallback: true };
  }

  status(): LanguageStatus {
    const missingKeys = this.missingKeys();
    const m = this.catalogue.meta;
    return {
      language: m.language,
      name: m.name,
      englishName: m.englishName,
      direction: m.direction,
      review: m.review,
      missingKeys,
      complete: missingKeys.length === 0,
    };
  }
}

/** Names of the arguments a compiled ICU message uses (plural/select arguments included). */
export function messageArguments(ast: unknown): Set<string> {
  const out = new Set<string>();
  const walk = (nodes: unknown) => {
    if (!Array.isArray(nodes)) return;
    for (const n of nodes as Array<Record<string, any>>) {
      if (n.type >= 1 && n.type <= 6 && typeof n.value === 'string') out.add(n.value);
      if (n.options) for (const o of Object.values(n.options)) walk((o as any).value);
      if (n.type === 8) walk(n.children);
    }
  };
  walk(ast);
  return out;
}
