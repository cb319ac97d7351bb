import { isAscii, isUtf8 } from 'node:buffer';
import type { Readable } from 'node:stream';
import { ImportCodes, decompressFailure, structural } from './issues.js';

export type TextEncoding = 'utf-8' | 'latin1';

/** Index of the first byte that breaks UTF-8, or -1; a sequence cut at the end is not an error. */
export function firstInvalidUtf8(buf: Uint8Array): number {
  let i = 0;
  const n = buf.length;
  while (i < n) {
    const b = buf[i] as number;
    if (b < 0x80) {
      i++;
      continue;
    }
    let need: number;
    if (b >= 0xc2 && b <= 0xdf) need = 1;
    else if (b >= 0xe0 && b <= 0xef) need = 2;
    else if (b >= 0xf0 && b <= 0xf4) need = 3;
    else return i;
    for (let k = 1; k <= need; k++) {
      if (i + k >= n) return -1; // may continue in the next chunk
      const c = buf[i + k] as number;
      if ((c & 0xc0) !== 0x80) return i;
    }
    i += need + 1;
  }
  return -1;
}

function countNewlines(buf: Buffer, end: number): number {
  let c = 0;
  for (let at = buf.indexOf(0x0a); at !== -1 && at < end; at = buf.indexOf(0x0a, at + 1)) c++;
  return c;
}

/** True when a chunk holds multi-byte UTF-8 and nothing that breaks it (Latin-1 would). */
function looksUtf8(buf: Buffer): boolean {
  return !isAscii(buf) && isUtf8(buf);
}

function checkStart(buf: Buffer, file: string, expected: TextEncoding): void {
  const utf16 =
    (buf[0] === 0xff && buf[1] === 0xfe) ||
    (buf[0] === 0xfe && buf[1] === 0xff) ||
    buf.subarray(0, 4096).includes(0);
  if (utf16) {
    throw structural(
      file,
      1,
      ImportCodes.encoding,
      `${file} looks like UTF-16 (or binary) text; this format is ${expected === 'utf-8' ? 'UTF-8' : 'Latin-1'}: save it as ${expected === 'utf-8' ? 'UTF-8' : 'the original release'} and try again`,
    );
  }
}

/** The stream's chunks; a decompressor failure becomes the importer's own error with the line. */
async function* unpacked(
  stream: Readable,
  file: string,
  line: () => number,
): AsyncGenerator<Buffer> {
  const it = (stream as AsyncIterable<Buffer>)[Symbol.asyncIterator]();
  for (;;) {
    let r: IteratorResult<Buffer>;
    try {
      r = await it.next();
    } catch (err) {
      throw decompressFailure(err, file, line()) ?? err;
    }
    if (r.done) return;
    yield r.value;
  }
}

/**
 * Decodes a byte stream to text chunks. UTF-8 is strict (a Latin-1 or Windows-1252 file stops
 * with the line of the first bad byte); Latin-1 refuses files that are really UTF-8.
 * `onBytes` gets each raw chunk's length, for progress.
 */
export async function* decodeText(
  stream: Readable,
  file: string,
  encoding: TextEncoding,
  onBytes?: (n: number) => void,
): AsyncGenerator<string> {
  const decoder = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false });
  let first = true;
  let linesBefore = 0;
  let pending: Buffer | null = null;
  for await (const raw of unpacked(stream, file, () => linesBefore + 1)) {
    onBytes?.(raw.length);
    const chunk: Buffer = pending ? Buffer.concat([pending, raw]) : raw;
    pending = null;
    if (first) {
      if (chunk.length < 4 && encoding === 'utf-8') {
        pending = chunk;
        continue;
      }
      checkStart(chunk, file, encoding);
      first = false;
    }
    if (encoding === 'latin1') {
      if (looksUtf8(chunk)) {
        throw structural(
          file,
          linesBefore + 1,
          ImportCodes.encoding,
          `${file} is UTF-8 encoded, but this release is Latin-1 (ISO-8859-1): use the files as published`,
        );
      }
      linesBefore += countNewlines(chunk, chunk.length);
      yield chunk.toString('latin1');
      continue;
    }
    try {
      const text = decoder.decode(chunk, { stream: true });
      linesBefore += countNewlines(chunk, chunk.length);
      if (text) yield text;
    } catch {
      const at = firstInvalidUtf8(chunk);
      const line = linesBefore + countNewlines(chunk, at < 0 ? chunk.length : at) + 1;
      throw structural(
        file,
        line,
        ImportCodes.encoding,
        `${file} line ${line}: not valid UTF-8 (is it Latin-1 or Windows-1252?): save the file as UTF-8 and try again`,
      );
    }
  }
  if (pending) {
    checkStart(pending, file, encoding);
    if (encoding === 'latin1') {
      yield pending.toString('latin1');
      return;
    }
    let text: string;
    try {
      text = decoder.decode(pending);
    } catch {
      // a file of 1-3 bytes that is not UTF-8: the same structural error as a longer one
      throw structural(
        file,
        1,
        ImportCodes.encoding,
        `${file} line 1: not valid UTF-8 (is it Latin-1 or Windows-1252?): save the file as UTF-8 and try again`,
      );
    }
    yield text;
    return;
  }
  if (encoding === 'utf-8') {
    try {
      const tail = decoder.decode();
      if (tail) yield tail;
    } catch {
      throw structural(
        file,
        linesBefore + 1,
        ImportCodes.truncated,
        `${file} ends inside a character: the file is truncated`,
      );
    }
  }
}

/** A batch of complete lines; `first` is the 1-based number of lines[0]. */
export interface LineBatch {
  lines: string[];
  first: number;
  /** Only on the last batch: whether the file's last line ended with a line break. */
  endsWithNewline?: boolean;
}

/**
 * Splits decoded text into lines at LF, in batches per chunk (a line may end in the CR of a
 * CRLF: the reader ignores it, which spares copying 700k lines) so a 700k-line file costs
 * a few hundred awaits, not 700k. The last line may lack a line break (SR28's files do).
 */
export async function* readLines(text: AsyncIterable<string>): AsyncGenerator<LineBatch> {
  let carry = '';
  let next = 1;
  let lastChar = '';
  for await (const chunk of text) {
    if (chunk.length === 0) continue;
    lastChar = chunk[chunk.length - 1] as string;
    const parts = (carry + chunk).split('\n');
    carry = parts.pop() ?? '';
    if (parts.length === 0) continue;
    yield { lines: parts, first: next };
    next += parts.length;
  }
  if (carry.length > 0) {
    yield { lines: [carry], first: next, endsWithNewline: false };
  } else {
    yield { lines: [], first: next, endsWithNewline: lastChar === '\n' || lastChar === '' };
  }
}
