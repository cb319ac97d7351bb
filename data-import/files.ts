import { createReadStream, type Stats } from 'node:fs';
import { open as openFile, readdir, stat } from 'node:fs/promises';
import { basename, join, relative } from 'node:path';
import { PassThrough, Transform, type Readable } from 'node:stream';
import { createGunzip, createInflateRaw } from 'node:zlib';
import yauzl from 'yauzl';
import { DEFAULT_UNPACK_LIMITS, UNPACK_ENV, type UnpackLimits } from './importer.js';
import {
  ImportCodes,
  NOT_CHANGED,
  decompressFailure,
  structural,
  type StructuralError,
} from './issues.js';

/** One file inside a folder, a zip, or a single path. */
export interface SetEntry {
  /** Path as shown in messages (relative inside a folder or zip). */
  name: string;
  /** Uncompressed size in bytes (0 when unknown, e.g. gzip). */
  size: number;
  /** Bytes read from disk for this entry (compressed for gzip and zip): progress counts these. */
  storedBytes: number;
  /** Unpacked size, or an estimate for gzip (for the free-disk check). */
  unpackedEstimate: number;
  /** Opens the unpacked bytes; `onStoredBytes` gets the bytes read from disk, for progress. */
  open(onStoredBytes?: (n: number) => void): Promise<Readable>;
}

const MIB = 1024 * 1024;
/** The ratio check starts after this many unpacked bytes (small files compress oddly). */
const RATIO_CHECK_AFTER = 4 * MIB;

/** Unpacked bytes of one import so far, checked against the limits. */
class UnpackBudget {
  unpacked = 0;
  constructor(readonly limits: UnpackLimits) {}

  /** Adds `n` unpacked bytes; the error when a limit is passed, else null. */
  add(file: string, n: number, storedBytes: number): StructuralError | null {
    this.unpacked += n;
    const l = this.limits;
    const stored = Math.max(1, storedBytes);
    if (this.unpacked > l.maxUnpackedBytes) {
      return structural(
        file,
        null,
        ImportCodes.unpackLimit,
        `${file}: unpacks to more than ${fmtBytes(l.maxUnpackedBytes)} (the import limit, ${UNPACK_ENV.maxUnpackedGiB} raises it); ${NOT_CHANGED}`,
      );
    }
    if (this.unpacked > RATIO_CHECK_AFTER && this.unpacked / stored > l.maxRatio) {
      return structural(
        file,
        null,
        ImportCodes.unpackLimit,
        `${file}: unpacks more than ${l.maxRatio} times its compressed size (${fmtBytes(this.unpacked)} from ${fmtBytes(stored)}; a food table compresses far less: is it a decompression bomb? ${UNPACK_ENV.maxRatio} raises the limit); ${NOT_CHANGED}`,
      );
    }
    return null;
  }

  /** A pass-through that counts unpacked bytes and stops the stream past a limit. */
  guard(file: string, storedSoFar: () => number): Transform {
    const add = (n: number) => this.add(file, n, storedSoFar());
    return new Transform({
      transform(chunk: Buffer, _enc, done) {
        const err = add(chunk.length);
        if (err) done(err);
        else done(null, chunk);
      },
    });
  }
}

export function fmtBytes(n: number): string {
  if (n >= 1024 ** 3) return `${(n / 1024 ** 3).toFixed(1)} GiB`;
  if (n >= MIB) return `${(n / MIB).toFixed(1)} MiB`;
  return `${Math.round(n / 1024)} KiB`;
}

/** Counts bytes passing through (the compressed side of a decompressor). */
function counter(onBytes: ((n: number) => void) | undefined, total: { n: number }): Transform {
  return new Transform({
    transform(chunk: Buffer, _enc, done) {
      total.n += chunk.length;
      onBytes?.(chunk.length);
      done(null, chunk);
    },
  });
}

/** Pipes a -> b, passing an error of `a` on to `b` (pipe alone does not). */
function chain<T extends NodeJS.WritableStream & Readable>(a: Readable, b: T): T {
  a.on('error', (e) => b.destroy(e));
  return a.pipe(b);
}

/** The files an import reads, from a folder, a .zip, or one (optionally gzipped) file. */
export interface FileSet {
  /** What the user gave, for messages. */
  label: string;
  entries: SetEntry[];
  /** Bytes on disk of every entry (compressed where compressed): the progress total. */
  storedBytes: number;
  /** Unpacked bytes of every entry (gzip estimated). */
  unpackedEstimate: number;
  /** The entry whose base name matches (case-insensitive), preferring the shallowest. */
  find(baseName: string): SetEntry | undefined;
  close(): void;
}

function makeSet(label: string, entries: SetEntry[], close: () => void): FileSet {
  return {
    label,
    entries,
    storedBytes: entries.reduce((n, e) => n + e.storedBytes, 0),
    unpackedEstimate: entries.reduce((n, e) => n + e.unpackedEstimate, 0),
    find(baseName) {
      const want = baseName.toLowerCase();
      const hits = entries.filter((e) => basename(e.name).toLowerCase() === want);
      hits.sort((a, b) => a.name.split('/').length - b.name.split('/').length);
      return hits[0];
    },
    close,
  };
}

async function statOrNull(path: string): Promise<Stats | null> {
  try {
    return await stat(path);
  } catch {
    return null;
  }
}

/**
 * Unpacked size of a gzip file for the free-disk check: the trailer's ISIZE (the size modulo
 * 2^32, RFC 1952 section 2.3.1) raised by whole 4 GiB steps to at least the compressed size,
 * and never under 4 times the compressed size (text tables compress 4-15:1; common practice,
 * no source), so a file over 4 GiB unpacked is not under-estimated.
 */
async function gzipEstimate(path: string, size: number): Promise<number> {
  if (size < 18) return size;
  const fh = await openFile(path, 'r');
  try {
    const buf = Buffer.alloc(4);
    await fh.read(buf, 0, 4, size - 4);
    let est = buf.readUInt32LE(0);
    while (est < size) est += 2 ** 32;
    return Math.max(est, size * 4);
  } finally {
    await fh.close();
  }
}

function fileEntry(
  path: string,
  name: string,
  size: number,
  budget: UnpackBudget,
  gzUnpacked: number,
): SetEntry {
  const gz = name.toLowerCase().endsWith('.gz');
  return {
    name,
    size: gz ? 0 : size,
    storedBytes: size,
    unpackedEstimate: gz ? gzUnpacked : size,
    open: (onStored) => {
      // Read in 64 KiB steps: the bytes read (the progress) stay close to what has been
      // imported, and each step's synchronous work stays short (a server importing an upload
      // answers requests between steps).
      const raw = createReadStream(path, { highWaterMark: 1 << 16 });
      if (!gz) {
        if (onStored) raw.on('data', (c) => onStored(c.length));
        return Promise.resolve(raw);
      }
      const read = { n: 0 };
      const counted = chain(raw, counter(onStored, read));
      const unpacked = chain(counted, createGunzip());
      return Promise.resolve(
        chain(
          unpacked,
          budget.guard(name, () => read.n),
        ),
      );
    },
  };
}

async function walk(
  dir: string,
  root: string,
  out: SetEntry[],
  depth: number,
  budget: UnpackBudget,
): Promise<void> {
  if (depth > 3) return;
  for (const d of await readdir(dir, { withFileTypes: true })) {
    const full = join(dir, d.name);
    if (d.isDirectory()) await walk(full, root, out, depth + 1, budget);
    else if (d.isFile()) {
      const s = await stat(full);
      const name = relative(root, full).split('\\').join('/');
      const est = name.toLowerCase().endsWith('.gz') ? await gzipEstimate(full, s.size) : s.size;
      out.push(fileEntry(full, name, s.size, budget, est));
    }
  }
}

/** A zip member's bytes: read raw (compressed) so progress counts compressed bytes. */
function zipMemberStream(
  zip: yauzl.ZipFile,
  entry: yauzl.Entry,
  budget: UnpackBudget,
  onStored: ((n: number) => void) | undefined,
): Promise<Readable> {
  return new Promise<Readable>((res, rej) =>
    zip.openReadStream(
      entry,
      (entry.compressionMethod === 8 ? { decompress: false } : {}) as never,
      (e, s) => {
        if (e || !s) return rej(e ?? new Error('no stream'));
        const read = { n: 0 };
        let out: Readable = chain(s, counter(onStored, read));
        if (entry.compressionMethod === 8) out = chain(out, createInflateRaw());
        else if (entry.compressionMethod !== 0) {
          return rej(
            structural(
              entry.fileName,
              null,
              ImportCodes.badZip,
              `${entry.fileName}: compression method ${entry.compressionMethod} is not supported (use a plain zip, deflate or stored); ${NOT_CHANGED}`,
            ),
          );
        }
        out = chain(
          out,
          budget.guard(entry.fileName, () => read.n),
        );
        // The unpacked size must be the one the zip's directory states (a cut or altered member).
        let unpacked = 0;
        const check = new Transform({
          transform(chunk: Buffer, _enc, done) {
            unpacked += chunk.length;
            done(null, chunk);
          },
          flush(done) {
            if (unpacked === entry.uncompressedSize) return done();
            done(
              decompressFailure(
                new Error(
                  `zip member unpacked to ${unpacked} bytes, the zip says ${entry.uncompressedSize}`,
                ),
                entry.fileName,
                null,
              ),
            );
          },
        });
        // yauzl's stream only moves in flowing mode: pipe it so async iteration works.
        res(chain(chain(out, check), new PassThrough({ highWaterMark: 1 << 20 })));
      },
    ),
  );
}

function openZip(path: string, budget: UnpackBudget): Promise<FileSet> {
  return new Promise((resolve, reject) => {
    yauzl.open(path, { lazyEntries: true, autoClose: false }, (err, zip) => {
      if (err || !zip) {
        reject(
          structural(
            path,
            null,
            ImportCodes.badZip,
            `${path} is not a readable zip file (${err?.message ?? 'unknown error'})`,
          ),
        );
        return;
      }
      const entries: SetEntry[] = [];
      zip.on('entry', (entry: yauzl.Entry) => {
        if (!entry.fileName.endsWith('/')) {
          entries.push({
            name: entry.fileName,
            size: entry.uncompressedSize,
            storedBytes: entry.compressedSize,
            unpackedEstimate: entry.uncompressedSize,
            open: (onStored) => zipMemberStream(zip, entry, budget, onStored),
          });
        }
        zip.readEntry();
      });
      zip.on('end', () => resolve(makeSet(path, entries, () => zip.close())));
      zip.on('error', (e: Error) =>
        reject(structural(path, null, ImportCodes.badZip, `${path}: broken zip (${e.message})`)),
      );
      zip.readEntry();
    });
  });
}

/**
 * Opens a folder, a .zip or a single (optionally gzipped) file as a FileSet; a missing path is
 * a structural error. Unpacking stops past `limits` (defaults `DEFAULT_UNPACK_LIMITS`).
 */
export async function openFileSet(
  path: string,
  limits: Partial<UnpackLimits> = {},
): Promise<FileSet> {
  const budget = new UnpackBudget({ ...DEFAULT_UNPACK_LIMITS, ...limits });
  const s = await statOrNull(path);
  if (!s) {
    throw structural(path, null, ImportCodes.notFound, `${path} does not exist`);
  }
  if (s.isDirectory()) {
    const entries: SetEntry[] = [];
    await walk(path, path, entries, 0, budget);
    return makeSet(path, entries, () => undefined);
  }
  if (path.toLowerCase().endsWith('.zip')) return openZip(path, budget);
  const name = basename(path);
  const est = name.toLowerCase().endsWith('.gz') ? await gzipEstimate(path, s.size) : s.size;
  return makeSet(path, [fileEntry(path, name, s.size, budget, est)], () => undefined);
}

/** The entry, or a structural error naming what is missing and what was found. */
export function requireEntry(set: FileSet, baseName: string): SetEntry {
  const e = set.find(baseName);
  if (!e) {
    const found = set.entries
      .slice(0, 12)
      .map((x) => x.name)
      .join(', ');
    throw structural(
      set.label,
      null,
      ImportCodes.missingFile,
      `${set.label} has no ${baseName}` + (found ? ` (found: ${found})` : ' (it is empty)'),
    );
  }
  return e;
}
