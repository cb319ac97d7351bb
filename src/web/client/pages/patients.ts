import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, fill, h, say } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { stageText, type Patient } from '../patient-types.js';
import { readPatientForm } from '../patient-form.js';

initChrome();
const listEl = byId('patient-list');
const filter = byId<HTMLInputElement>('patient-filter');
let patients: Patient[] = [];

function render(): void {
  const q = filter.value.trim().toLowerCase();
  const shown = patients.filter(
    (p) => !q || p.label.toLowerCase().includes(q) || (p.name ?? '').toLowerCase().includes(q),
  );
  if (shown.length === 0) {
    fill(
      listEl,
      h(
        'p',
        { class: 'muted' },
        patients.length ? 'No patient matches.' : 'No patients yet: create the first record.',
      ),
    );
    return;
  }
  fill(
    listEl,
    h(
      'table',
      {},
      h(
        'thead',
        {},
        h(
          'tr',
          {},
          h('th', {}, 'Label'),
          h('th', {}, 'Stage'),
          h('th', { class: 'n' }, 'Weight for targets'),
          h('th', {}, 'Language'),
        ),
      ),
      h(
        'tbody',
        {},
        shown.map((p) =>
          h(
            'tr',
            {},
            h(
              'td',
              {},
              h('a', { href: `/patients/${p.id}` }, p.label),
              p.name ? h('span', { class: 'muted' }, ` · ${p.name}`) : null,
              p.isDemo ? h('span', { class: 'flag flag-demo' }, ' invented demo') : null,
            ),
            h('td', {}, stageText(p), p.diabetes ? ', diabetes' : ''),
            h('td', { class: 'n num' }, `${p.weightKg} kg`),
            h('td', {}, p.language),
          ),
        ),
      ),
    ),
  );
}

async function load(): Promise<void> {
  try {
    patients = await api<Patient[]>('GET', endpoints.patients);
    render();
  } catch (err) {
    fill(listEl, h('p', { class: 'status error' }, `Could not load patients: ${errorText(err)}`));
  }
}

filter.addEventListener('input', render);
byId<HTMLFormElement>('patient-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const read = readPatientForm(e.currentTarget as HTMLFormElement);
  if (!read.ok) {
    say('patient-form-status', read.message, 'error');
    return;
  }
  say('patient-form-status', 'Saving…');
  api<Patient>('POST', endpoints.patients, read.value)
    .then((p) => location.assign(`/patients/${p.id}`))
    .catch((err: unknown) => say('patient-form-status', errorText(err), 'error'));
});
void load();
