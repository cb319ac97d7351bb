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
                    `${d.entryCount} entries, ${d.unmatchedCount} unmatched, ${d.reviewCount ?? 0} waiting for review`,
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

/** "line 4", or "line 4, food 2" for the second food of a line. */
function entryName(e: Entry): string {
  return e.part > 0 ? `line ${e.line}, food ${e.part + 1}` : `line ${e.line}`;
}

/** The amount boxes of the entries on screen, by entry key. */
const amounts = new Map<string, HTMLInputElement>();

/** Entries left out of the totals until the reviewer confirms them: the list to work through. */
function renderReview(a: Audit): void {
  const box = byId('diary-review');
  const items = a.review ?? [];
  fill(
    box,
    items.length === 0
      ? h('p', { class: 'muted', 'data-testid': 'review-empty' }, 'Nothing waits for review.')
      : h(
          'ul',
          { class: 'swap-list' },
          items.map((r) => {
            const e = a.entries.find((x) => x.key === r.key);
            return h(
              'li',
              { 'data-review-key': r.key },
              h('strong', {}, `${e ? entryName(e) : `line ${r.line}`}: ${r.text}`),
              e?.match ? ` → ${e.match.name}` : null,
              h('div', { class: 'small' }, r.reasons.join('; ')),
            );
          }),
        ),
  );
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
    'aria-label': `Change the match for ${entryName(e)}`,
  });
  const list = h('ul', {
    id: listId,
    role: 'listbox',
    class: 'results',
    hidden: true,
    'aria-label': 'Matching foods',
  });
  const others = e.candidates;
  const amount = h('input', {
    id: `amount-${index}`,
    type: 'text',
    class: 'entry-amount',
    autocomplete: 'off',
    placeholder: e.grams === null ? 'e.g. 100 g' : 'new amount',
    'aria-label': `Amount eaten for ${entryName(e)} (leave empty to keep the diary's amount)`,
  });
  amounts.set(e.key, amount);
  const wrap = h(
    'div',
    { class: 'entry-fix' },
    e.match
      ? h(
          'button',
          {
            type: 'button',
            class: 'btn btn-small',
            'aria-label': `Confirm the match for ${entryName(e)}`,
            onclick: () => void setMatch(e, e.match!.foodId, 'confirm'),
          },
          'Confirm',
        )
      : null,
    amount,
    others.length
      ? h(
          'select',
          {
            'aria-label': `Runner-up foods for ${entryName(e)}`,
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
            { 'data-line': String(e.line), 'data-key': e.key },
            h('td', { class: 'num' }, e.part > 0 ? `${e.line}.${e.part + 1}` : String(e.line)),
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
              e.review.length > 0
                ? h(
                    'span',
                    { class: 'flag flag-review', 'data-testid': 'awaiting-review' },
                    'awaiting review: not counted',
                  )
                : null,
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
  amounts.clear();
  renderReview(a);
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
  const name = entryName(e);
  say('diary-status', how === 'confirm' ? `Confirming ${name}…` : `Changing the match of ${name}…`);
  const quantity = amounts.get(e.key)?.value.trim() ?? '';
  try {
    const next = await api<Audit>(
      'POST',
      `${endpoints.diaryAudit(auditId(audit))}/entries/${e.line}/match`,
      {
        foodId,
        action: how,
        ...(e.part > 0 ? { part: e.part } : {}),
        ...(quantity ? { quantity } : {}),
      },
    );
    render(next);
    const upper = name.charAt(0).toUpperCase() + name.slice(1);
    say(
      'diary-status',
      how === 'confirm'
        ? `${upper} confirmed; remembered for this clinic.`
        : `${upper} now matches a new food; remembered for this clinic.`,
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
        `${a.entries.length} entries read, ${a.unmatched.length} unmatched, ${a.review.length} waiting for review.`,
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
