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
type ImportJob = import('../../../imports/imports.js').ImportJob;
interface Format {
  format: string;
  title: string;
  where: string;
  pathHint: string;
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
  const sel = byId<HTMLSelectElement>('import-format');
  const hint = byId('import-format-hint');
  try {
    const formats = await api<Format[]>('GET', endpoints.importFormats);
    fill(
      sel,
      formats.map((f) => h('option', { value: f.format }, f.title)),
    );
    const show = () => {
      const f = formats.find((x) => x.format === sel.value);
      hint.textContent = f ? `File: ${f.pathHint}. Where to get it: ${f.where}` : '';
    };
    sel.addEventListener('change', show);
    show();
  } catch (err) {
    hint.textContent = `Formats unavailable: ${errorText(err)}`;
  }
}

function showProgress(job: ImportJob): void {
  const wrap = byId('import-progress-wrap');
  const bar = byId<HTMLProgressElement>('import-progress');
  wrap.hidden = false;
  bar.max = 100;
  if (job.fraction !== null) bar.value = Math.round(job.fraction * 100);
  else bar.removeAttribute('value');
  const p = job.progress;
  byId('import-progress-label').textContent =
    `Import ${job.state}` +
    (job.fraction !== null ? `: ${num(job.fraction * 100, 0)} % read` : '') +
    (p ? ` (${p.file}, ${num(p.rows, 0)} rows)` : '');
}

async function follow(id: string | number): Promise<void> {
  for (;;) {
    const job = await api<ImportJob>('GET', endpoints.importJob(id));
    showProgress(job);
    if (job.state === 'done' && job.result?.ok) {
      const r = job.result;
      const problems = r.errors
        .slice(0, 5)
        .map((e) => `${e.file}${e.line ? ` line ${e.line}` : ''}: ${e.message}`);
      say(
        'import-status',
        `Imported ${count(r.imported)} foods, ${count(r.values)} nutrient values and ${count(r.portions)} household measures; ${count(r.skipped)} rows left out.` +
          (problems.length
            ? ` ${count(r.issueCount)} problems, first: ${problems.join('; ')}`
            : ''),
        'ok',
      );
      await loadSources();
      return;
    }
    if (job.state === 'failed' || job.state === 'done') {
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
  // The fields go before the file: the server reads them first.
  form.append('format', byId<HTMLSelectElement>('import-format').value);
  const release = byId<HTMLInputElement>('import-release').value.trim();
  if (release) form.append('release', release);
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
