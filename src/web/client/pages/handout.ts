import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, pageParams } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { initFoodNames } from '../food-names.js';
import type { Patient } from '../patient-types.js';

initChrome();
const planId = pageParams().id ?? '';
/** A sheet for an earlier saved version (`?version=N`, from a read-only plate ledger). */
const version = (() => {
  const v = Number(new URLSearchParams(location.search).get('version'));
  return Number.isInteger(v) && v > 0 ? v : null;
})();
const langSel = byId<HTMLSelectElement>('handout-lang');
const paperSel = byId<HTMLSelectElement>('handout-paper');
const frame = byId<HTMLIFrameElement>('handout-frame');
const pdf = byId<HTMLAnchorElement>('handout-pdf');
byId<HTMLAnchorElement>('back-to-plan').href =
  `/plans/${planId}${version ? `?version=${version}` : ''}`;

/**
 * The print view is fetched and shown in a same-origin frame through `srcdoc` (the server
 * forbids framing its pages directly). A srcdoc document takes this page's URL as its base, so
 * the view's root-relative styles resolve without a `<base>` (which the inherited CSP,
 * `base-uri 'none'`, refuses).
 */
async function show(): Promise<void> {
  const lang = langSel.value;
  pdf.href = endpoints.handoutPdf(planId, lang, paperSel.value, version);
  pdf.setAttribute(
    'download',
    `plan-${planId}${version ? `-v${version}` : ''}-${lang}-${paperSel.value}.pdf`,
  );
  const url = new URL(location.origin + endpoints.handoutHtml(planId, lang, version));
  url.searchParams.set('paper', paperSel.value);
  try {
    const res = await fetch(url, { credentials: 'same-origin', headers: { accept: 'text/html' } });
    const text = await res.text();
    if (!res.ok) throw new Error(`${res.status}: ${text.slice(0, 200)}`);
    showClinicCheck(res.headers.get('x-phosledger-clinic-missing') ?? '');
    frame.srcdoc = text;
    frame.dataset.lang = lang;
  } catch (err) {
    frame.srcdoc = `<p>The sheet could not be prepared: ${escapeHtml(errorText(err))}</p>`;
  }
}

/** A real patient's sheet prints only with the clinic's own details: say so, and hold the PDF. */
function showClinicCheck(missing: string): void {
  const notice = byId('handout-clinic-missing');
  notice.hidden = missing === '';
  pdf.setAttribute('aria-disabled', missing === '' ? 'false' : 'true');
  pdf.classList.toggle('is-disabled', missing !== '');
}
pdf.addEventListener('click', (e) => {
  if (pdf.getAttribute('aria-disabled') === 'true') e.preventDefault();
});

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

const foodNames = initFoodNames(planId, () => langSel.value, version, show);
langSel.addEventListener('change', () => {
  void show();
  void foodNames.refresh();
});
paperSel.addEventListener('change', () => void show());
byId('handout-print').addEventListener('click', () => frame.contentWindow?.print());

async function start(): Promise<void> {
  const want = new URLSearchParams(location.search).get('lang');
  if (want) langSel.value = want;
  else {
    try {
      const plan = await api<{ patientId: number }>('GET', endpoints.plan(planId));
      const patient = await api<Patient>('GET', endpoints.patient(plan.patientId));
      const base = patient.language.split('-')[0] ?? 'en';
      if ([...langSel.options].some((o) => o.value === base)) langSel.value = base;
    } catch {
      // Language stays English; the sheet itself will say what went wrong.
    }
  }
  await show();
  await foodNames.refresh();
}
void start();
