import { JSONParser } from '@streamparser/json';
import type { Readable } from 'node:stream';
import { decodeText } from './decode.js';
import { ImportCodes, NOT_CHANGED, StructuralError, structural } from './issues.js';

/** One element of a top-level array: its key in the document (`FoundationFoods`) and index. */
export interface JsonItem {
  key: string;
  index: number;
  value: unknown;
  /** The line the chunk holding the element's end started on (for messages). */
  line: number;
}

function countNewlines(text: string): number {
  let n = 0;
  for (let at = text.indexOf('\n'); at !== -1; at = text.indexOf('\n', at + 1)) n++;
  return n;
}

/**
 * Streams the elements of the arrays under a JSON document's top-level keys
 * (`{"FoundationFoods": [ {...}, ... ]}`) in batches, one batch per decoded chunk, with a
 * streaming parser (@streamparser/json): memory holds one element, never the document.
 * Broken or cut JSON stops the import with the line it was noticed on.
 */
export async function* readJsonArrays(stream: Readable, file: string): AsyncGenerator<JsonItem[]> {
  const parser = new JSONParser({ paths: ['$.*.*'], keepStack: false });
  let batch: JsonItem[] = [];
  let line = 1;
  let indexInKey = new Map<string, number>();
  let currentKey = '';
  parser.onValue = ({ value, stack }) => {
    const holder = stack[1];
    const key = typeof holder?.key === 'string' ? holder.key : '';
    if (key !== currentKey) {
      currentKey = key;
      indexInKey = new Map();
    }
    const index = indexInKey.get(key) ?? 0;
    indexInKey.set(key, index + 1);
    batch.push({ key, index, value, line });
  };
  const fail = (err: unknown, at: number): StructuralError =>
    err instanceof StructuralError
      ? err
      : structural(
          file,
          at,
          ImportCodes.json,
          `${file} near line ${at}: not valid JSON (${(err as Error).message}); ${NOT_CHANGED}`,
        );
  for await (const text of decodeText(stream, file, 'utf-8')) {
    try {
      parser.write(text);
    } catch (err) {
      throw fail(err, line);
    }
    line += countNewlines(text);
    if (batch.length) {
      yield batch;
      batch = [];
    }
  }
  try {
    // The parser ends by itself after the document's closing brace.
    if (!parser.isEnded) parser.end();
  } catch (err) {
    throw structural(
      file,
      line,
      ImportCodes.truncated,
      `${file} line ${line}: the JSON document ends early (a cut download?): ${(err as Error).message}; ${NOT_CHANGED}`,
    );
  }
  if (batch.length) yield batch;
}
