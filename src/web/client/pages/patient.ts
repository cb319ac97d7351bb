import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, fill, h, pageParams, say } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { num } from '../format.js';
import {
  INGREDIENT_NAMES,
  stageText,
  TARGET_NAMES,
  targetText,
  type LabResult,
  type Patient,
  type Targets,
} from '../patient-types.js';
import { newDay, toPlanInput } from '../plan-draft.js';
import { ANALYTE_DEFINITIONS, ANALYTES } from '../../../patients/analytes.js';
import type { Trends } from '../../../patients/trends.js';
import { renderTrends } from '../trend-charts.js';

initChrome();
const id = pageParams().id ?? '';
let patient: Patient | undefined;

interface PlanRow {
  id: number;
  name: string;
  days: number | unknown[];
  version?: number;
  latestVersion?: number;
  updatedAt?: string;
}

function renderHead(p: Patient): void {
  byId('patient-h').textContent = p.name ? `${p.label} · ${p.name}` : p.label;
  byId('crumb-patient').textContent = p.label;
  document.title = `${p.label} · phosledger`;
}

function renderTargets(t: Targets, p: Patient): void {
  fill(
    byId('targets'),
    h(
      'p',
      { class: 'small muted' },
      `${stageText(p)}${p.diabetes ? ', diabetes' : ''}; weight used for targets ${p.weightKg} kg; preferred language `,
      h('span', { id: 'patient-language' }, p.language),
      '.',
    ),
    h(
      'dl',
      { class: 'kv' },
      Object.entries(t).flatMap(([key, target]) => [
        h('dt', {}, TARGET_NAMES[key] ?? key),
        h(
          'dd',
          { 'data-target': key },
          h('strong', { class: 'num' }, targetText(target)),
          target.perKg
            ? h(
                'span',
                { class: 'muted small' },
                ` (${num(target.perKg.min, 2)}–${num(target.perKg.max, 2)} ${target.perKg.unit})`,
              )
            : null,
          target.setBy === 'dietitian'
            ? h('span', { class: 'flag flag-ratio' }, ' set by the dietitian')
            : null,
          h('div', { class: 'source' }, target.source),
          target.note ? h('div', { class: 'source' }, target.note) : null,
        ),
      ]),
    ),
  );
}

function labText(l: LabResult): string {
  const conv =
    l.unit === 'mg/dL' && l.mmolPerL !== undefined
      ? ` (${num(l.mmolPerL, 2)} mmol/L)`
      : l.unit !== l.canonicalUnit
        ? ` (${num(l.canonicalValue, 2)} ${l.canonicalUnit})`
        : '';
  return `${num(l.value, 2)} ${l.unit}${conv}`;
}

function analyteName(a: string): string {
  return (ANALYTE_DEFINITIONS as Record<string, { label: string } | undefined>)[a]?.label ?? a;
}

function renderLabs(p: Patient): void {
  fill(
    byId('labs'),
    p.identifier
      ? h(
          'p',
          { class: 'small', id: 'identifier-text' },
          `Record-system identifier: ${p.identifier.value}${p.identifier.system ? ` (${p.identifier.system})` : ''}`,
        )
      : h('p', { class: 'small muted', id: 'identifier-text' }, 'No record-system identifier set.'),
    p.labs.length === 0
      ? h('p', { class: 'muted' }, 'No results recorded.')
      : h(
          'table',
          {},
          h(
            'thead',
            {},
            h('tr', {}, h('th', {}, 'Date'), h('th', {}, 'Result'), h('th', {}, 'Value')),
          ),
          h(
            'tbody',
            {},
            p.labs
              .slice(0, 8)
              .map((l) =>
                h(
                  'tr',
                  {},
                  h('td', { class: 'num' }, l.date),
                  h('td', {}, analyteName(l.analyte)),
                  h('td', { class: 'num' }, labText(l)),
                ),
              ),
          ),
        ),
    h(
      'p',
      { class: 'source' },
      'Converted with UCUM; mass to amount with IUPAC standard atomic weights (P 30.974, Ca 40.078 g/mol) and stated molar masses (PTH 1 pg/mL = 0.106 pmol/L). Every result is in the trend view below.',
    ),
  );
  const idForm = p.identifier;
  byId<HTMLInputElement>('id-system').value = idForm?.system ?? '';
  byId<HTMLInputElement>('id-value').value = idForm?.value ?? '';
}

function renderBinder(p: Patient): void {
  const b = p.binder;
  fill(
    byId('binder'),
    b
      ? h(
          'dl',
          { class: 'kv' },
          h('dt', {}, 'Ingredient'),
          h('dd', {}, INGREDIENT_NAMES[b.ingredient] ?? b.ingredient),
          h('dt', {}, 'One unit'),
          h('dd', { class: 'num' }, `${b.unitStrengthMg} mg`),
          h('dt', {}, 'Prescribed'),
          h(
            'dd',
            { class: 'num' },
            `${b.units} units ${b.schedule === 'per-meal' ? 'with each meal' : 'per day'}`,
          ),
          b.otherMedicines && b.otherMedicines.length
            ? [h('dt', {}, 'Other medicines'), h('dd', {}, b.otherMedicines.join(', '))]
            : null,
        )
      : h('p', { class: 'muted' }, 'No phosphate binder recorded.'),
  );
  byId<HTMLSelectElement>('bf-ingredient').value = b?.ingredient ?? '';
  byId<HTMLInputElement>('bf-strength').value = b ? String(b.unitStrengthMg) : '';
  byId<HTMLInputElement>('bf-units').value = b ? String(b.units) : '';
  byId<HTMLSelectElement>('bf-schedule').value = b?.schedule ?? 'per-day';
}

function renderPlans(plans: PlanRow[]): void {
  fill(
    byId('plans'),
    plans.length === 0
      ? h('p', { class: 'muted' }, 'No plans yet.')
      : h(
          'table',
          {},
          h(
            'thead',
            {},
            h(
              'tr',
              {},
              h('th', {}, 'Plan'),
              h('th', { class: 'n' }, 'Days'),
              h('th', { class: 'n' }, 'Version'),
              h('th', {}, 'Open'),
            ),
          ),
          h(
            'tbody',
            {},
            plans.map((pl) =>
              h(
                'tr',
                {},
                h('td', {}, h('a', { href: `/plans/${pl.id}` }, pl.name)),
                h(
                  'td',
                  { class: 'n num' },
                  String(Array.isArray(pl.days) ? pl.days.length : pl.days),
                ),
                h('td', { class: 'n num' }, String(pl.latestVersion ?? pl.version ?? '')),
                h('td', {}, h('a', { href: `/plans/${pl.id}/preview` }, 'Take-home sheet')),
              ),
            ),
          ),
        ),
  );
}

async function loadPlans(): Promise<void> {
  try {
    renderPlans(await api<PlanRow[]>('GET', endpoints.patientPlans(id)));
  } catch (err) {
    fill(
      byId('plans'),
      h('p', { class: 'status error' }, `Could not load plans: ${errorText(err)}`),
    );
  }
}

async function save(
  update: Record<string, unknown>,
  statusId: string,
  done: string,
): Promise<void> {
  say(statusId, 'Saving…');
  try {
    // The language is always sent: the update schema would otherwise reset it to its default.
    const body = patient ? { language: patient.language, ...update } : update;
    patient = await api<Patient>('PATCH', endpoints.patient(id), body);
    renderAll(patient);
    say(statusId, done, 'ok');
    void loadTargets();
    void loadTrends();
  } catch (err) {
    say(statusId, errorText(err), 'error');
  }
}

async function loadTargets(): Promise<void> {
  if (!patient) return;
  try {
    renderTargets(await api<Targets>('GET', endpoints.patientTargets(id)), patient);
  } catch (err) {
    fill(
      byId('targets'),
      h('p', { class: 'status error' }, `Targets unavailable: ${errorText(err)}`),
    );
  }
}

function renderAll(p: Patient): void {
  renderHead(p);
  renderLabs(p);
  renderBinder(p);
}

function fillUnits(): void {
  const analyte = byId<HTMLSelectElement>('lab-kind').value as (typeof ANALYTES)[number];
  const units = Object.keys(ANALYTE_DEFINITIONS[analyte]?.units ?? {}).filter((u) => u !== 'ug/L');
  fill(
    byId('lab-unit'),
    units.map((u) => h('option', { value: u }, u)),
  );
}
fill(
  byId('lab-kind'),
  ANALYTES.map((a) => h('option', { value: a }, ANALYTE_DEFINITIONS[a].label)),
);
fillUnits();
byId('lab-kind').addEventListener('change', fillUnits);

byId<HTMLFormElement>('lab-form').addEventListener('submit', (e) => {
  e.preventDefault();
  if (!patient) return;
  const value = Number(byId<HTMLInputElement>('lab-value').value);
  const date = byId<HTMLInputElement>('lab-date').value;
  if (!Number.isFinite(value) || value <= 0 || !date) {
    say('lab-status', 'Give a value above 0 and the date the sample was taken.', 'error');
    return;
  }
  const entered = {
    analyte: byId<HTMLSelectElement>('lab-kind').value,
    value,
    unit: byId<HTMLSelectElement>('lab-unit').value,
    date,
  };
  say('lab-status', 'Saving…');
  api('POST', endpoints.patientLabs(id), entered)
    .then(async () => {
      patient = await api<Patient>('GET', endpoints.patient(id));
      renderAll(patient);
      say('lab-status', 'Result added.', 'ok');
      await loadTrends();
    })
    .catch((err: unknown) => say('lab-status', errorText(err), 'error'));
});

byId<HTMLFormElement>('identifier-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const value = byId<HTMLInputElement>('id-value').value.trim();
  const system = byId<HTMLInputElement>('id-system').value.trim();
  void save(
    { identifier: value ? { system: system || null, value } : null },
    'identifier-status',
    value ? 'Identifier saved.' : 'Identifier cleared.',
  );
});

byId<HTMLFormElement>('fhir-import-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const file = byId<HTMLInputElement>('fhir-file').files?.[0];
  if (!file) {
    say('fhir-import-status', 'Choose a FHIR Bundle file (JSON) first.', 'error');
    return;
  }
  say('fhir-import-status', 'Importing…');
  fill(byId('fhir-rejected'));
  file
    .text()
    .then((text) => {
      try {
        return JSON.parse(text) as unknown;
      } catch {
        throw new Error(`${file.name} is not JSON`);
      }
    })
    .then((bundle) =>
      api<{
        imported: number;
        duplicates: number;
        rejected: Array<{ entry: number; reason: string }>;
      }>('POST', endpoints.labsImport, bundle),
    )
    .then(async (r) => {
      say(
        'fhir-import-status',
        `${r.imported} imported, ${r.duplicates} already stored, ${r.rejected.length} refused.`,
        r.rejected.length > 0 ? 'error' : 'ok',
      );
      fill(
        byId('fhir-rejected'),
        r.rejected.map((x) => h('li', {}, x.reason)),
      );
      patient = await api<Patient>('GET', endpoints.patient(id));
      renderAll(patient);
      await loadTrends();
    })
    .catch((err: unknown) => say('fhir-import-status', errorText(err), 'error'));
});

async function loadTrends(): Promise<void> {
  try {
    fill(byId('trends'), renderTrends(await api<Trends>('GET', endpoints.patientTrends(id))));
  } catch (err) {
    fill(
      byId('trends'),
      h('p', { class: 'status error' }, `Trends unavailable: ${errorText(err)}`),
    );
  }
}

function overridesWith(key: string, value: { min: number | null; max: number | null } | null) {
  const current = { ...((patient?.targetOverrides ?? {}) as Record<string, unknown>) };
  if (value) current[key] = value;
  else delete current[key];
  return current;
}

byId<HTMLFormElement>('target-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const key = byId<HTMLSelectElement>('tf-key').value;
  const read = (id: string) => {
    const t = byId<HTMLInputElement>(id).value.trim();
    return t === '' ? null : Number(t);
  };
  const min = read('tf-min');
  const max = read('tf-max');
  if (
    (min === null && max === null) ||
    (min !== null && !(min >= 0)) ||
    (max !== null && !(max > 0))
  ) {
    say(
      'target-status',
      'Give at least one end: a number of 0 or more (at least), above 0 (at most).',
      'error',
    );
    return;
  }
  void save(
    { targetOverrides: overridesWith(key, { min, max }) },
    'target-status',
    'Target set by the dietitian.',
  );
});
byId('tf-default').addEventListener('click', () => {
  const key = byId<HTMLSelectElement>('tf-key').value;
  void save({ targetOverrides: overridesWith(key, null) }, 'target-status', 'Back to the default.');
});

byId<HTMLFormElement>('binder-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const ingredient = byId<HTMLSelectElement>('bf-ingredient').value;
  if (!ingredient) {
    void save({ binder: null }, 'binder-status', 'No binder recorded.');
    return;
  }
  const unitStrengthMg = Number(byId<HTMLInputElement>('bf-strength').value);
  const units = Number(byId<HTMLInputElement>('bf-units').value);
  if (!(unitStrengthMg > 0) || !Number.isInteger(units) || units < 1) {
    say(
      'binder-status',
      'Give the strength of one unit in mg and the whole number of units prescribed.',
      'error',
    );
    return;
  }
  const schedule = byId<HTMLSelectElement>('bf-schedule').value;
  void save(
    {
      binder: {
        ingredient,
        unitStrengthMg,
        units,
        schedule,
        otherMedicines: patient?.binder?.otherMedicines ?? [],
      },
    },
    'binder-status',
    'Prescription saved as written.',
  );
});

byId<HTMLFormElement>('new-plan-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const name = byId<HTMLInputElement>('new-plan-name').value.trim();
  if (!name) {
    say('plans-status', 'Give the plan a name.', 'error');
    return;
  }
  say('plans-status', 'Creating…');
  api<{ id: number }>('POST', endpoints.patientPlans(id), toPlanInput({ name, days: [newDay(0)] }))
    .then((pl) => location.assign(`/plans/${pl.id}`))
    .catch((err: unknown) => say('plans-status', errorText(err), 'error'));
});

async function start(): Promise<void> {
  try {
    patient = await api<Patient>('GET', endpoints.patient(id));
  } catch (err) {
    fill(
      byId('targets'),
      h('p', { class: 'status error' }, `Could not open the record: ${errorText(err)}`),
    );
    return;
  }
  renderAll(patient);
  await Promise.all([loadTargets(), loadPlans(), loadTrends()]);
}
void start();
