import { api, currentSession } from '../api.js';
import { initChrome } from '../chrome.js';
import { errorText, fill, h, say } from '../dom.js';
import { endpoints } from '../endpoints.js';

initChrome();

type Json = string | number | boolean | null | Json[] | { [k: string]: Json };

/** What `GET /api/settings/:key` answers: the value, and where known its default and sources. */
interface SettingJson {
  key: string;
  value: Json;
  default: Json;
  /** Where the default comes from (guideline, paper, or "common practice, no source"). */
  source: string | Record<string, string> | null;
  description?: string;
  isDefault: boolean;
  updatedAt: string | null;
  /** The role that may change it (an admin may change every setting). */
  editableBy?: string;
}

/** Shows a setting the user may not change read-only, saying who changes it. */
function makeReadOnly(form: HTMLFormElement, s: SettingJson): void {
  for (const el of form.querySelectorAll<HTMLInputElement | HTMLButtonElement>(
    'input, textarea, button',
  )) {
    el.disabled = true;
  }
  form.append(h('p', { class: 'source' }, `Only an ${s.editableBy ?? 'admin'} changes these.`));
}

const LABELS: Record<string, string> = {
  name: 'Clinic name',
  contact: 'Contact (phone, address)',
  dietitianName: 'Dietitian’s name',
  animalOrganic: 'Animal protein phosphorus (organic)',
  plantOrganic: 'Plant phosphorus, non-phytate',
  phytate: 'Phytate phosphorus',
  additive: 'Additive (inorganic) phosphorus',
  unknown: 'Phosphorus of unknown kind',
  low: 'Low',
  typical: 'Typical',
  high: 'High',
  binderMinAbsorbableMgPerOccasion: 'No binder under this absorbable P per occasion (mg)',
  highLoadOccasionMg: 'High-load occasion from (mg absorbable P)',
  highRatioMgPerG: 'High phosphorus-to-protein ratio from (mg/g)',
  swapMaxShare: 'Swap must carry at most this share of the original (0–1)',
  topContributors: 'Top contributors listed (count)',
  highRatioMinProteinGPer100g: 'High-ratio flag only from this protein (g per 100 g)',
};

function labelFor(key: string): string {
  return LABELS[key] ?? key.replace(/([A-Z])/g, ' $1').replace(/^./, (c) => c.toUpperCase());
}

let fieldSeq = 0;
/** Builds inputs that mirror the value's shape; numbers stay numbers, nested objects get a fieldset. */
function fields(
  value: Json,
  path: string[],
  sources: Record<string, string> | null,
): HTMLElement[] {
  if (value && typeof value === 'object' && !Array.isArray(value)) {
    return Object.entries(value).map(([k, v]) => {
      const p = [...path, k];
      if (v && typeof v === 'object' && !Array.isArray(v)) {
        const src = sources?.[p.join('.')] ?? sources?.[k];
        return h(
          'fieldset',
          { class: 'subform' },
          h('legend', {}, labelFor(k)),
          h('div', { class: 'field-row' }, fields(v, p, sources)),
          src ? h('p', { class: 'source' }, src) : null,
        );
      }
      return leaf(v, p, sources?.[p.join('.')] ?? sources?.[k]);
    });
  }
  return [leaf(value, path, undefined)];
}

function leaf(v: Json, path: string[], source: string | undefined): HTMLElement {
  const id = `set-${++fieldSeq}`;
  const key = path[path.length - 1] ?? '';
  const isNum = typeof v === 'number';
  const input = h(
    key === 'contact' ? 'textarea' : 'input',
    isNum
      ? {
          id,
          type: 'number',
          step: 'any',
          value: String(v),
          'data-path': path.join('.'),
          'data-type': 'number',
          inputmode: 'decimal',
        }
      : {
          id,
          type: 'text',
          'data-path': path.join('.'),
          'data-type': typeof v === 'boolean' ? 'boolean' : 'string',
          rows: '2',
        },
  ) as HTMLInputElement;
  if (!isNum) input.value = v === null ? '' : String(v);
  return h(
    'div',
    { class: 'field' },
    h('label', { for: id }, labelFor(key)),
    input,
    source ? h('span', { class: 'source' }, source) : null,
  );
}

function read(form: HTMLFormElement): Json {
  const out: Record<string, Json> = {};
  for (const el of form.querySelectorAll<HTMLInputElement>('[data-path]')) {
    const path = (el.dataset.path ?? '').split('.');
    let obj = out;
    for (const p of path.slice(0, -1)) obj = (obj[p] ??= {}) as Record<string, Json>;
    const last = path[path.length - 1] ?? '';
    obj[last] =
      el.dataset.type === 'number'
        ? el.value.trim() === ''
          ? NaN
          : Number(el.value)
        : el.value.trim();
  }
  return out;
}

/** "key: text | key: text" (one source per field) into a map; null when it is one plain text. */
function splitSources(source: string | null): Record<string, string> | null {
  if (!source || !source.includes(' | ')) return null;
  const out: Record<string, string> = {};
  for (const part of source.split(' | ')) {
    const m = /^(\w+): (.*)$/s.exec(part);
    if (!m || !m[1] || !m[2]) return null;
    out[m[1]] = `Default: ${m[2]}`;
  }
  return out;
}

function show(box: HTMLElement, s: SettingJson): void {
  const perField = s.source && typeof s.source === 'object' ? s.source : splitSources(s.source);
  fill(
    box,
    s.description ? h('p', { class: 'small muted' }, s.description) : null,
    fields(s.value, [], perField),
    typeof s.source === 'string' && !perField
      ? h('p', { class: 'source' }, `Defaults: ${s.source}`)
      : null,
    h(
      'p',
      { class: 'source' },
      s.isDefault
        ? 'Using the defaults.'
        : `Changed by the clinic${s.updatedAt ? ` on ${s.updatedAt.slice(0, 16).replace('T', ' ')} UTC` : ''}.`,
    ),
  );
}

async function setUp(form: HTMLFormElement): Promise<void> {
  const key = form.dataset.key ?? '';
  const box = form.querySelector('.fields') as HTMLElement;
  const statusId = `${key}-status`;
  let setting: SettingJson;
  try {
    setting = await api<SettingJson>('GET', endpoints.setting(key));
    show(box, setting);
  } catch (err) {
    fill(box, h('p', { class: 'status error' }, `Setting unavailable: ${errorText(err)}`));
    return;
  }
  const { user } = await currentSession();
  if (
    user?.role !== 'admin' &&
    setting.editableBy !== undefined &&
    setting.editableBy !== user?.role
  ) {
    makeReadOnly(form, setting);
    return;
  }
  const reset = h('button', { type: 'button', class: 'btn btn-quiet' }, 'Back to defaults');
  form.querySelector('button[type="submit"]')?.after(' ', reset);
  reset.addEventListener('click', () => {
    say(statusId, 'Restoring the defaults…');
    api<SettingJson>('DELETE', endpoints.setting(key))
      .then((saved) => {
        show(box, saved);
        say(statusId, 'Defaults restored.', 'ok');
      })
      .catch((err: unknown) => say(statusId, errorText(err), 'error'));
  });
  form.addEventListener('submit', (e) => {
    e.preventDefault();
    const value = read(form);
    say(statusId, 'Saving…');
    api<SettingJson>('PUT', endpoints.setting(key), value)
      .then((saved) => {
        show(box, saved);
        say(statusId, 'Saved.', 'ok');
      })
      .catch((err: unknown) => say(statusId, errorText(err), 'error'));
  });
}

for (const form of document.querySelectorAll<HTMLFormElement>('form[data-key]')) void setUp(form);
