import { createReadStream, type Stats } from 'node:fs';
import { readdir, stat } from 'node:fs/promises';
import { basename, join, relative } from 'node:path';
import { PassThrough, type Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import yauzl from 'yauzl';
import { ImportCodes, structural } from './issues.js';

/** One file inside a folder, a zip, or a single path. */
export interface SetEntry {
  /** Path as shown in messages (relative inside a folder or zip). */
  name: string;
  /** Uncompressed size in bytes (0 when unknown, e.g. gzip). */
  size: number;
  open(): Promise<Readable>;
}

/** The files an import reads, from a folder, a .zip, or one (optionally gzipped) file. */
export interface FileSet {
  /** What the user gave, for messages. */
  label: string;
  entries: SetEntry[];
  /** The entry whose base name matches (case-insensitive), preferring the shallowest. */
  find(baseName: string): SetEntry | undefined;
  close(): void;
}

function makeSet(label: string, entries: SetEntry[], close: () => void): FileSet {
  return {
    label,
    entries,
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

function fileEntry(path: string, name: string, size: number): SetEntry {
  return {
    name,
    size: name.endsWith('.gz') ? 0 : size,
    open: () => {
      const raw = createReadStream(path, { highWaterMark: 1 << 20 });
      return Promise.resolve(name.endsWith('.gz') ? raw.pipe(createGunzip()) : raw);
    },
  };
}

async function walk(dir: string, root: string, out: SetEntry[], depth: number): Promise<void> {
  if (depth > 3) return;
  for (const d of await readdir(dir, { withFileTypes: true })) {
    const full = join(dir, d.name);
    if (d.isDirectory()) await walk(full, root, out, depth + 1);
    else if (d.isFile()) {
      const s = await stat(full);
      out.push(fileEntry(full, relative(root, full).split('\\').join('/'), s.size));
    }
  }
}

function openZip(path: string): Promise<FileSet> {
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
            open: () =>
              new Promise<Readable>((res, rej) =>
                zip.openReadStream(entry, (e, s) => {
                  if (e || !s) return rej(e ?? new Error('no stream'));
                  // yauzl's stream only moves in flowing mode: pipe it so async iteration works.
                  const out = new PassThrough({ highWaterMark: 1 << 20 });
                  s.on('error', (x: Error) => out.destroy(x));
                  res(s.pipe(out));
                }),
              ),
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

/** Opens a folder, a .zip or a single file as a FileSet; a missing path is a structural error. */
export async function openFileSet(path: string): Promise<FileSet> {
  const s = await statOrNull(path);
  if (!s) {
    throw structural(path, null, ImportCodes.notFound, `${path} does not exist`);
  }
  if (s.isDirectory()) {
    const entries: SetEntry[] = [];
    await walk(path, path, entries, 0);
    return makeSet(path, entries, () => undefined);
  }
  if (path.toLowerCase().endsWith('.zip')) return openZip(path);
  return makeSet(path, [fileEntry(path, basename(path), s.size)], () => undefined);
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
