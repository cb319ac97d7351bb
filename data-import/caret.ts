import type { Readable } from 'node:stream';
import { decodeText, readLines } from './decode.js';
import { ImportCodes, structural, type IssueLog } from './issues.js';

/**
 * Streams a USDA SR ASCII file: fields separated by '^', text fields wrapped in '~', CRLF line
 * ends, Latin-1 text. Rows with the wrong number of fields or a broken '~' are reported and
 * skipped; a first line that does not fit (wrong file or delimiter) or a last line cut short
 * (truncated file) stops the import.
 */
export async function readCaretFile(
  stream: Readable,
  file: string,
  fieldCount: number,
  issues: IssueLog,
  onBytes: ((n: number) => void) | undefined,
  /** Indexes of the fields the caller reads (others come back as ''); default all. */
  want: readonly number[] | undefined,
  /** Called per good row; `fields` is reused between calls: copy what you keep. */
  onRow: (fields: string[], line: number) => void,
): Promise<void> {
  let seen = 0;
  const wanted = new Uint8Array(fieldCount);
  for (const k of want ?? Array.from({ length: fieldCount }, (_, i) => i)) wanted[k] = 1;
  const starts = new Int32Array(fieldCount + 1);
  const fields: string[] = new Array<string>(fieldCount).fill('');
  for await (const batch of readLines(decodeText(stream, file, 'latin1', onBytes))) {
    const lines = batch.lines;
    for (let i = 0; i < lines.length; i++) {
      const text = lines[i] as string;
      const line = batch.first + i;
      // The end of the line, before the CR of a CRLF.
      const end = text.charCodeAt(text.length - 1) === 13 ? text.length - 1 : text.length;
      if (end === 0) continue;
      // Field boundaries without allocating: the 700k-line NUT_DATA has 18 fields a line.
      let count = 1;
      starts[0] = 0;
      for (let at = text.indexOf('^'); at !== -1 && at < end; at = text.indexOf('^', at + 1)) {
        if (count <= fieldCount) starts[count] = at + 1;
        count++;
      }
      const isLast = batch.endsWithNewline === false && i === lines.length - 1;
      if (count !== fieldCount) {
        if (seen === 0) {
          const other = [',', '\t', '|', ';'].find((d) => text.split(d).length >= fieldCount);
          throw structural(
            file,
            line,
            count === 1 && other ? ImportCodes.delimiter : ImportCodes.columns,
            `${file} line ${line}: ${count} field${count === 1 ? '' : 's'} where this file has ${fieldCount} separated by '^'` +
              (count === 1 && other
                ? ` (it looks separated by '${other === '\t' ? 'tab' : other}')`
                : '') +
              ': is this the right file of the SR ASCII release?',
          );
        }
        if (isLast && count < fieldCount) {
          throw structural(
            file,
            line,
            ImportCodes.truncated,
            `${file} line ${line}: the file ends in the middle of a row (truncated?)`,
          );
        }
        issues.skip(
          file,
          line,
          ImportCodes.rowFields,
          `${file} line ${line}: ${count} fields, expected ${fieldCount}`,
        );
        continue;
      }
      starts[fieldCount] = end + 1;
      let ok = true;
      for (let k = 0; k < fieldCount; k++) {
        if (wanted[k] === 0) continue;
        let a = starts[k] as number;
        let b = (starts[k + 1] as number) - 1;
        if (text.charCodeAt(a) === 126 /* ~ */) {
          if (b - a < 2 || text.charCodeAt(b - 1) !== 126) {
            ok = false;
            break;
          }
          a++;
          b--;
        }
        fields[k] = text.slice(a, b);
      }
      if (!ok) {
        if (isLast) {
          throw structural(
            file,
            line,
            ImportCodes.truncated,
            `${file} line ${line}: the file ends inside a text field (truncated?)`,
          );
        }
        issues.skip(
          file,
          line,
          ImportCodes.rowFields,
          `${file} line ${line}: a text field is not closed with '~'`,
        );
        continue;
      }
      seen++;
      onRow(fields, line);
    }
  }
}
