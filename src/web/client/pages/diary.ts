import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, fill, h, say } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { g, mg, range } from '../format.js';
import type { Patient } from '../patient-types.js';
import type { DiaryEntryReport, DiaryReport } from '../../../diary/findings.js';
import { attachTypeahead } from '../typeahead.js';

initChrome();

type Entry = DiaryEntryReport;
type Audit = DiaryReport & {
  id: number;
  patientId: number | null;
  createdAt: string;
  updatedAt: string;
};

let audit: Audit | undefined;

function auditId(a: Audit): string {
  return String(a.id);
}

const METHOD_TEXT: Record<string, string> = {
  barcode: 'by barcode',
  remembered: 'remembered for this clinic',
  confirmed: 'confirmed by the dietitian',
  text: 'by its words',
  none: '',
};

function confClass(c: number): string {
  return c >= 0.8 ? 'conf-high' : c >= 0.5 ? 'conf-mid' : 'conf-low';
}
function confText(c: number): string {
  return `${Math.round(c * 100)} %`;
}

function renderDays(a: Audit): void {
  fill(
    byId('diary-days'),
    a.days.length === 0
      ? h('p', { class: 'muted' }, 'No day totals.')
      : h(
          'table',
          {},
          h(
            'thead',
            {},
            h(
              'tr',
              {},
              h('th', {}, 'Day'),
              h('th', { class: 'n' }, 'Phosphorus'),
              h('th', { class: 'n' }, 'Absorbable'),
              h('th', { class: 'n' }, 'Additive P'),
              h('th', { class: 'n' }, 'Protein'),
              h('th', {}, 'Against targets'),
            ),
          ),
          h(
            'tbody',
            {},
            a.days.map((d) =>
              h(
                'tr',
                {},
                h(
                  'td',
                  {},
                  d.label,
                  h(
                    'div',
                    { class: 'small muted' },
                    `${d.entryCount} entries, ${d.unmatchedCount} unmatched`,
                  ),
                ),
                h('td', { class: 'n num' }, mg(d.nutrients.phosphorusMg)),
                h('td', { class: 'n num' }, range(d.nutrients.absorbablePhosphorusMg)),
                h('td', { class: 'n num' }, mg(d.nutrients.additivePhosphorusMg)),
                h('td', { class: 'n num' }, g(d.nutrients.proteinG)),
                h(
                  'td',
                  { class: 'small' },
                  a.targetsSource === 'none'
                    ? 'no patient linked: no targets'
                    : d.status.checks
                        .filter((c) => c.status === 'above' || c.status === 'below')
                        .map((c) => c.message)
                        .join('; ') || 'within the targets set',
                ),
              ),
            ),
          ),
        ),
  );
}

function renderDayExtras(a: Audit): void {
  const box = byId('diary-days');
  for (const d of a.days) {
    if (d.topContributors.length === 0) continue;
    box.append(
      h('h3', {}, `${d.label}: heaviest loads`),
      h(
        'ul',
        { class: 'swap-list' },
        d.topContributors.map((c) => {
          const sw = d.swaps.find((x) => x.foodId === c.foodId);
          return h(
            'li',
            {},
            `${c.name}: ${mg(c.absorbablePhosphorusMgTypical)} absorbable (${Math.round(c.share * 100)} % of the day's phosphorus)`,
            sw && sw.swaps.length
              ? h(
                  'div',
                  { class: 'small muted' },
                  `Swaps: ${sw.swaps.map((x) => `${x.name} (${Math.round(x.shareOfOriginal * 100)} %)`).join('; ')}`,
                )
              : null,
          );
        }),
      ),
    );
  }
  if (a.skipped.length) {
    box.append(
      h('h3', {}, 'Lines left out'),
      h(
        'ul',
        { class: 'swap-list' },
        a.skipped.map((x) => h('li', {}, `line ${x.line}: ${x.message}`)),
      ),
    );
  }
  box.append(h('p', { class: 'source' }, a.caution));
}

function fixer(e: Entry, index: number): HTMLElement {
  const inputId = `fix-${index}`;
  const listId = `fix-${index}-list`;
  const input = h('input', {
    id: inputId,
    type: 'text',
    role: 'combobox',
    'aria-autocomplete': 'list',
    'aria-expanded': 'false',
    'aria-controls': listId,
    autocomplete: 'off',
    'aria-label': `Change the match for line ${e.line}`,
  });
  const list = h('ul', {
    id: listId,
    role: 'listbox',
    class: 'results',
    hidden: true,
    'aria-label': 'Matching foods',
  });
  const others = e.candidates;
  const wrap = h(
    'div',
    { class: 'entry-fix' },
    e.match
      ? h(
          'button',
          {
            type: 'button',
            class: 'btn btn-small',
            'aria-label': `Confirm the match for line ${e.line}`,
            onclick: () => void setMatch(e, e.match!.foodId, 'confirm'),
          },
          'Confirm',
        )
      : null,
    others.length
      ? h(
          'select',
          {
            'aria-label': `Runner-up foods for line ${e.line}`,
            onchange: (ev: Event) => {
              const v = (ev.target as HTMLSelectElement).value;
              if (v) void setMatch(e, Number(v), 'change');
            },
          },
          h('option', { value: '' }, 'Runners-up…'),
          others.map((c) =>
            h('option', { value: String(c.foodId) }, `${c.name} (${confText(c.confidence)})`),
          ),
        )
      : null,
    h('div', { class: 'typeahead' }, input, list),
  );
  attachTypeahead({ input, list, limit: 8, onPick: (hit) => void setMatch(e, hit.id, 'change') });
  return wrap;
}

function renderEntries(a: Audit): void {
  fill(
    byId('diary-entries'),
    h(
      'table',
      {},
      h(
        'thead',
        {},
        h(
          'tr',
          {},
          h('th', {}, 'Line'),
          h('th', {}, 'Diary text'),
          h('th', {}, 'Matched food'),
          h('th', { class: 'n' }, 'Confidence'),
          h('th', { class: 'n' }, 'Amount'),
          h('th', { class: 'n' }, 'Phosphorus'),
          h('th', {}, 'Findings'),
          h('th', {}, 'Fix the match'),
        ),
      ),
      h(
        'tbody',
        {},
        a.entries.map((e, i) =>
          h(
            'tr',
            { 'data-line': String(e.line) },
            h('td', { class: 'num' }, String(e.line)),
            h('td', {}, e.text),
            h(
              'td',
              {},
              h('span', { 'data-testid': 'match-name' }, e.match ? e.match.name : 'unmatched'),
              METHOD_TEXT[e.matchMethod]
                ? h('div', { class: 'small muted' }, METHOD_TEXT[e.matchMethod])
                : null,
            ),
            h(
              'td',
              { class: 'n' },
              e.match
                ? h(
                    'span',
                    { class: `conf ${confClass(e.match.confidence)}` },
                    confText(e.match.confidence),
                  )
                : '—',
            ),
            h(
              'td',
              { class: 'n num' },
              e.grams === null ? '—' : g(e.grams, 0),
              e.quantityAssumed ? h('div', { class: 'small muted' }, 'portion assumed') : null,
              e.quantityNote ? h('div', { class: 'small muted' }, e.quantityNote) : null,
            ),
            h(
              'td',
              { class: 'n num' },
              mg(e.phosphorusMg),
              e.absorbablePhosphorusMg
                ? h(
                    'div',
                    { class: 'small muted' },
                    `absorbable ${range(e.absorbablePhosphorusMg)}`,
                  )
                : null,
            ),
            h(
              'td',
              {},
              e.hidden ? h('span', { class: 'flag flag-hidden' }, 'hidden additive') : null,
              (e.additivePhosphorusMg ?? 0) > 0
                ? h(
                    'span',
                    { class: 'flag flag-additive' },
                    `additive ${mg(e.additivePhosphorusMg)}`,
                  )
                : null,
              e.findings.length
                ? h(
                    'details',
                    {},
                    h(
                      'summary',
                      {},
                      `${e.findings.length} ${e.findings.length === 1 ? 'finding' : 'findings'}`,
                    ),
                    h(
                      'ul',
                      { class: 'swap-list' },
                      e.findings.map((f) => h('li', {}, f)),
                    ),
                  )
                : null,
            ),
            h('td', {}, fixer(e, i)),
          ),
        ),
      ),
    ),
  );
}

function render(a: Audit): void {
  audit = a;
  renderDays(a);
  renderDayExtras(a);
  renderEntries(a);
  const pdf = byId<HTMLAnchorElement>('diary-pdf');
  const id = auditId(a);
  if (id) {
    pdf.href = endpoints.diaryAuditPdf(id);
    pdf.hidden = false;
  }
}

async function setMatch(e: Entry, foodId: number, how: 'confirm' | 'change'): Promise<void> {
  if (!audit) return;
  say(
    'diary-status',
    how === 'confirm' ? `Confirming line ${e.line}…` : `Changing the match of line ${e.line}…`,
  );
  try {
    const next = await api<Audit>(
      'POST',
      `${endpoints.diaryAudit(auditId(audit))}/entries/${e.line}/match`,
      { foodId, action: how },
    );
    render(next);
    say(
      'diary-status',
      how === 'confirm'
        ? `Line ${e.line} confirmed; remembered for this clinic.`
        : `Line ${e.line} now matches a new food; remembered for this clinic.`,
      'ok',
    );
  } catch (err) {
    say('diary-status', errorText(err), 'error');
  }
}

byId<HTMLFormElement>('diary-form').addEventListener('submit', (ev) => {
  ev.preventDefault();
  const text = byId<HTMLTextAreaElement>('diary-text').value;
  const file = byId<HTMLInputElement>('diary-file').files?.[0];
  const patient = byId<HTMLSelectElement>('diary-patient').value;
  if (!file && !text.trim()) {
    say('diary-status', 'Paste the diary or choose a CSV file.', 'error');
    return;
  }
  say('diary-status', 'Sifting…');
  let req: Promise<Audit>;
  if (file) {
    const form = new FormData();
    if (patient) form.append('patientId', patient);
    form.append('file', file);
    req = api<Audit>('POST', endpoints.diaryAudits, undefined, { form });
  } else {
    req = api<Audit>('POST', endpoints.diaryAudits, {
      text,
      ...(patient ? { patientId: Number(patient) } : {}),
    });
  }
  req
    .then((a) => {
      render(a);
      say(
        'diary-status',
        `${a.entries.length} entries read, ${a.unmatched.length} unmatched.`,
        'ok',
      );
    })
    .catch((err: unknown) => say('diary-status', errorText(err), 'error'));
});

void api<Patient[]>('GET', endpoints.patients)
  .then((ps) => {
    const sel = byId<HTMLSelectElement>('diary-patient');
    for (const p of ps) sel.append(h('option', { value: String(p.id) }, p.label));
  })
  .catch(() => undefined);
