import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, fill, h, say } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { num } from '../format.js';

initChrome();

interface Source {
  id: number;
  format: string;
  name: string;
  release: string;
  licence: string | null;
  url: string | null;
  importedAt: string;
  foods: number;
  nutrientValues: number | null;
  portions: number | null;
  skipped: number | null;
}
interface ImportJob {
  id: string | number;
  state: 'queued' | 'running' | 'done' | 'failed';
  format?: string | null;
  fileName?: string;
  progress?: { done: number; total: number | null; phase?: string } | null;
  result?: {
    imported?: number;
    skipped?: number;
    errors?: Array<{ line?: number; message: string }>;
  } | null;
  error?: { code: string; message: string } | null;
}

const count = (n: number | null | undefined) => (n === null || n === undefined ? '—' : num(n, 0));

async function loadSources(): Promise<void> {
  try {
    const sources = await api<Source[]>('GET', endpoints.sources);
    fill(
      byId('sources'),
      sources.length === 0
        ? h('p', { class: 'muted' }, 'No food table imported yet.')
        : h(
            'table',
            {},
            h(
              'thead',
              {},
              h(
                'tr',
                {},
                h('th', {}, 'Table'),
                h('th', {}, 'Release'),
                h('th', { class: 'n' }, 'Foods'),
                h('th', { class: 'n' }, 'Nutrient values'),
                h('th', { class: 'n' }, 'Household measures'),
                h('th', { class: 'n' }, 'Skipped'),
                h('th', {}, 'Imported'),
              ),
            ),
            h(
              'tbody',
              {},
              sources.map((s) =>
                h(
                  'tr',
                  {},
                  h(
                    'td',
                    {},
                    s.name,
                    h('div', { class: 'source' }, s.format, s.licence ? ` · ${s.licence}` : ''),
                  ),
                  h('td', {}, s.release),
                  h('td', { class: 'n num' }, count(s.foods)),
                  h('td', { class: 'n num' }, count(s.nutrientValues)),
                  h('td', { class: 'n num' }, count(s.portions)),
                  h('td', { class: 'n num' }, count(s.skipped)),
                  h('td', { class: 'num' }, s.importedAt.slice(0, 16).replace('T', ' ')),
                ),
              ),
            ),
          ),
    );
  } catch (err) {
    fill(
      byId('sources'),
      h('p', { class: 'status error' }, `Could not list the tables: ${errorText(err)}`),
    );
  }
}

async function loadFormats(): Promise<void> {
  try {
    const formats = await api<Array<{ format: string; title?: string }>>(
      'GET',
      endpoints.importFormats,
    );
    const sel = byId<HTMLSelectElement>('import-format');
    for (const f of formats) sel.append(h('option', { value: f.format }, f.title ?? f.format));
  } catch {
    // Detection from the file still works.
  }
}

function showProgress(job: ImportJob): void {
  const wrap = byId('import-progress-wrap');
  const bar = byId<HTMLProgressElement>('import-progress');
  wrap.hidden = false;
  const p = job.progress;
  if (p && p.total) {
    bar.max = p.total;
    bar.value = p.done;
  } else if (job.state === 'done') {
    bar.max = 1;
    bar.value = 1;
  } else bar.removeAttribute('value');
  byId('import-progress-label').textContent =
    `Import ${job.state}${p?.phase ? `: ${p.phase}` : ''}${p?.total ? ` (${num((p.done / p.total) * 100, 0)} %)` : ''}`;
}

async function follow(id: string | number): Promise<void> {
  for (;;) {
    const job = await api<ImportJob>('GET', endpoints.importJob(id));
    showProgress(job);
    if (job.state === 'done') {
      const r = job.result;
      say(
        'import-status',
        `Imported ${count(r?.imported)} foods, skipped ${count(r?.skipped)}.${
          r?.errors?.length
            ? ` ${r.errors.length} problems: ${r.errors
                .slice(0, 3)
                .map((e) => (e.line ? `line ${e.line}: ` : '') + e.message)
                .join('; ')}`
            : ''
        }`,
        'ok',
      );
      await loadSources();
      return;
    }
    if (job.state === 'failed') {
      say(
        'import-status',
        `Import failed, nothing was changed: ${job.error?.message ?? 'unknown error'}`,
        'error',
      );
      return;
    }
    await new Promise((r) => setTimeout(r, 400));
  }
}

byId<HTMLFormElement>('import-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const file = byId<HTMLInputElement>('import-file').files?.[0];
  if (!file) {
    say('import-status', 'Choose a release file first.', 'error');
    return;
  }
  const form = new FormData();
  const format = byId<HTMLSelectElement>('import-format').value;
  if (format) form.append('format', format);
  form.append('file', file);
  say('import-status', `Uploading ${file.name}…`);
  api<ImportJob>('POST', endpoints.imports, undefined, { form })
    .then((job) => {
      say('import-status', `Import of ${file.name} started.`);
      return follow(job.id);
    })
    .catch((err: unknown) => say('import-status', errorText(err), 'error'));
});

void loadSources();
void loadFormats();
