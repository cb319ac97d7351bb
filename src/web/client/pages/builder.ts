import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, fill, h, pageParams, say } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { g, kcal, mg, range, ratio } from '../format.js';
import { TARGET_NAMES, type Target } from '../patient-types.js';
import {
  addDay,
  addItem,
  addOccasion,
  checkQuantity,
  gramsFor,
  removeItem,
  updateItem,
  type DraftItem,
  type Measure,
  toPlanInput,
  type PlanDraft,
} from '../plan-draft.js';
import type {
  BinderSlot,
  Nutrients,
  PlanSummary,
  SummaryDay,
  SummaryItem,
} from '../summary-types.js';
import { attachTypeahead, type FoodHit } from '../typeahead.js';

initChrome();

interface PlanJson extends PlanDraft {
  id: number;
  patientId: number;
  version?: number;
}
interface FoodInfo {
  id: number;
  name: string;
  portions: Measure[];
}

const planId = pageParams().id ?? '';
const foods = new Map<number, FoodInfo>();
let plan: PlanJson | undefined;
let draft: PlanDraft = { name: '', days: [] };
let summary: PlanSummary | undefined;
let activeDay = 0;
let dirty = false;
let picked: FoodHit | undefined;
let summarySeq = 0;

const searchInput = byId<HTMLInputElement>('food-search');
const daySel = byId<HTMLSelectElement>('add-day');
const occSel = byId<HTMLSelectElement>('add-occasion');
const picker = byId('measure-picker');
const amountInput = byId<HTMLInputElement>('pick-amount');
const measureSel = byId<HTMLSelectElement>('pick-measure');
const gramsOut = byId<HTMLOutputElement>('pick-grams');

// ---- saving and the live summary -------------------------------------------------------------

function setSaveState(text: string, error = false): void {
  const el = byId('save-state');
  el.textContent = text;
  el.className = `save-state${error ? ' error' : ''}`;
}

/** Every change is saved as a new version of the plan (earlier versions are kept), then summed. */
async function commit(next: PlanDraft): Promise<void> {
  draft = next;
  dirty = true;
  renderMeals();
  setSaveState('Saving…');
  const mine = ++summarySeq;
  try {
    const saved = await api<PlanJson>('PUT', endpoints.plan(planId), toPlanInput(draft));
    if (mine !== summarySeq) return;
    plan = saved;
    dirty = false;
    setSaveState(saved.version ? `Saved as version ${saved.version}` : 'Saved');
    await refreshSummary(mine);
  } catch (err) {
    if (mine === summarySeq) setSaveState(`Not saved: ${errorText(err)}`, true);
  }
}

async function refreshSummary(mine = ++summarySeq): Promise<void> {
  const s = await api<PlanSummary>('GET', endpoints.planSummary(planId));
  if (mine !== summarySeq) return;
  summary = s;
  renderMeals();
  renderSide();
}

window.addEventListener('beforeunload', (e) => {
  if (dirty) e.preventDefault();
});

// ---- the adder: day, occasion, type-ahead, measure ----------------------------------------

function fillAdderSelects(): void {
  const keepOcc = occSel.value;
  fill(
    daySel,
    draft.days.map((d, i) => h('option', { value: String(i), selected: i === activeDay }, d.label)),
  );
  const day = draft.days[activeDay];
  fill(
    occSel,
    (day?.occasions ?? []).map((o, j) => h('option', { value: String(j) }, o.name)),
  );
  if (keepOcc && Number(keepOcc) < (day?.occasions.length ?? 0)) occSel.value = keepOcc;
}

function chosenMeasure(): Measure | null {
  if (!picked || measureSel.value === 'g') return null;
  return foods.get(picked.id)?.portions.find((m) => String(m.id) === measureSel.value) ?? null;
}

function updatePickGrams(): void {
  const check = checkQuantity(Number(amountInput.value), chosenMeasure());
  gramsOut.textContent = check.ok ? `${check.grams} g` : '—';
  amountInput.setAttribute('aria-invalid', String(!check.ok));
}

/** "1 cup = 240 g": the table gives grams for `amount` of the measure; show it per one. */
function measureText(m: Measure): string {
  return `${m.description} (${gramsFor(1, m)} g each)`;
}

async function openPicker(hit: FoodHit): Promise<void> {
  picked = hit;
  byId('picked-name').textContent = hit.name;
  byId('picked-per100').textContent =
    `· P ${mg(hit.per100g.phosphorusMg)} and protein ${g(hit.per100g.proteinG)} per 100 g`;
  await loadFood(hit.id, hit.name);
  if (picked !== hit) return;
  const measures = foods.get(hit.id)?.portions ?? [];
  fill(
    measureSel,
    measures.map((m) => h('option', { value: String(m.id) }, measureText(m))),
    h('option', { value: 'g' }, 'grams'),
  );
  // A household measure is offered first when the table has one: it is what patients say.
  measureSel.value = measures[0] ? String(measures[0].id) : 'g';
  amountInput.value = measures[0] ? '1' : '100';
  picker.hidden = false;
  updatePickGrams();
  amountInput.focus();
  amountInput.select();
}

function closePicker(): void {
  picked = undefined;
  picker.hidden = true;
  searchInput.focus();
}

function addPicked(): void {
  if (!picked) return;
  const measure = chosenMeasure();
  const amount = Number(amountInput.value);
  const check = checkQuantity(amount, measure);
  if (!check.ok) {
    say('adder-status', check.message, 'error');
    amountInput.focus();
    return;
  }
  const day = Number(daySel.value);
  const occ = Number(occSel.value);
  const item: DraftItem = {
    foodId: picked.id,
    grams: check.grams,
    measure: measure
      ? { portionId: measure.id, count: amount, description: measure.description }
      : null,
  };
  const occName = draft.days[day]?.occasions[occ]?.name ?? '';
  say('adder-status', `Added ${picked.name}, ${check.grams} g, to ${occName}.`, 'ok');
  activeDay = day;
  picker.hidden = true;
  picked = undefined;
  searchTa.clear();
  searchInput.focus();
  void commit(addItem(draft, day, occ, item));
}

const searchTa = attachTypeahead({
  input: searchInput,
  list: byId<HTMLUListElement>('food-results'),
  onPick: (hit) => void openPicker(hit),
});
amountInput.addEventListener('input', updatePickGrams);
measureSel.addEventListener('change', updatePickGrams);
for (const el of [amountInput, measureSel]) {
  el.addEventListener('keydown', (e) => {
    const ke = e as KeyboardEvent;
    if (ke.key === 'Enter') {
      ke.preventDefault();
      addPicked();
    } else if (ke.key === 'Escape') closePicker();
  });
}
byId('pick-add').addEventListener('click', addPicked);
byId('pick-cancel').addEventListener('click', closePicker);
daySel.addEventListener('change', () => {
  activeDay = Number(daySel.value);
  renderMeals();
  renderSide();
});

// ---- meals: day tabs, occasions, items --------------------------------------------------------

function summaryDay(i: number): SummaryDay | undefined {
  return summary?.days[i];
}
function summaryItem(day: number, occ: number, k: number): SummaryItem | undefined {
  return summaryDay(day)?.occasions[occ]?.items[k];
}

function evidenceOf(item: SummaryItem | undefined): {
  additive: boolean;
  highRatio: boolean;
  lines: string[];
} {
  if (!item) return { additive: false, highRatio: false, lines: [] };
  const f = (item.flags ?? {}) as Record<string, unknown>;
  const flagList = Array.isArray(item.flags) ? (item.flags as unknown[]).map(String) : [];
  const additive =
    item.additiveLikely === true ||
    f.additiveLikely === true ||
    f.additive === true ||
    flagList.some((x) => x.includes('additive')) ||
    (item.nutrients.additivePhosphorusMg ?? 0) > 0;
  const highRatio =
    item.highRatio === true || f.highRatio === true || flagList.some((x) => x.includes('ratio'));
  const ev =
    item.additiveEvidence ??
    item.evidence ??
    (Array.isArray(f.evidence) ? (f.evidence as string[]) : []);
  return { additive, highRatio, lines: ev.map(String) };
}

let tipSeq = 0;
function flagWithTip(kind: 'additive' | 'ratio', text: string, lines: string[]): HTMLElement {
  const id = `tip-${++tipSeq}`;
  return h(
    'span',
    { class: `flag flag-${kind} has-tip`, tabindex: '0', 'aria-describedby': id },
    text,
    h(
      'span',
      { class: 'tip', role: 'tooltip', id },
      lines.length
        ? h(
            'ul',
            {},
            lines.map((l) => h('li', {}, l)),
          )
        : 'No further evidence recorded.',
    ),
  );
}

function quantityCell(day: number, occ: number, k: number, item: DraftItem): HTMLElement {
  const food = foods.get(item.foodId);
  const measures = food?.portions ?? [];
  const measure = measures.find((m) => m.id === item.measure?.portionId) ?? null;
  const name = food?.name ?? `food ${item.foodId}`;
  const input = h('input', {
    type: 'number',
    min: '0.1',
    step: 'any',
    value: String(measure ? (item.measure?.count ?? 1) : item.grams),
    'aria-label': `Quantity of ${name} in ${measure ? measure.description : 'grams'}`,
    inputmode: 'decimal',
  });
  const sel = h(
    'select',
    { 'aria-label': `Measure for ${name}` },
    measures.map((m) =>
      h(
        'option',
        { value: String(m.id), selected: m.id === item.measure?.portionId },
        measureText(m),
      ),
    ),
    h('option', { value: 'g', selected: !measure }, 'g'),
  );
  const apply = () => {
    const m = sel.value === 'g' ? null : (measures.find((x) => String(x.id) === sel.value) ?? null);
    const amount = Number(input.value);
    const check = checkQuantity(amount, m);
    if (!check.ok) {
      input.setAttribute('aria-invalid', 'true');
      setSaveState(check.message, true);
      return;
    }
    input.removeAttribute('aria-invalid');
    void commit(
      updateItem(
        draft,
        day,
        occ,
        k,
        m
          ? {
              grams: check.grams,
              measure: { portionId: m.id, count: amount, description: m.description },
            }
          : { grams: check.grams, measure: null },
      ),
    );
  };
  input.addEventListener('change', apply);
  input.addEventListener('keydown', (e) => {
    if ((e as KeyboardEvent).key === 'Enter') {
      e.preventDefault();
      apply();
    }
  });
  sel.addEventListener('change', () => {
    const m = sel.value === 'g' ? null : (measures.find((x) => String(x.id) === sel.value) ?? null);
    // Switching measure keeps the weight: convert the shown amount.
    input.value = String(m ? Math.round((item.grams / gramsFor(1, m)) * 100) / 100 : item.grams);
    apply();
  });
  return h(
    'td',
    { class: 'qty' },
    h('div', { class: 'field-row' }, input, sel),
    h('span', { class: 'muted small num' }, `${item.grams} g`),
  );
}

function renderTabs(): void {
  const tabs = byId('day-tabs');
  fill(
    tabs,
    draft.days.map((d, i) =>
      h(
        'button',
        {
          type: 'button',
          role: 'tab',
          id: `day-tab-${i}`,
          'aria-selected': String(i === activeDay),
          'aria-controls': 'day-panel',
          tabindex: i === activeDay ? '0' : '-1',
          onclick: () => selectDay(i, false),
          onkeydown: (e: Event) => {
            const k = (e as KeyboardEvent).key;
            if (k === 'ArrowRight') selectDay((i + 1) % draft.days.length, true);
            else if (k === 'ArrowLeft')
              selectDay((i - 1 + draft.days.length) % draft.days.length, true);
          },
        },
        d.label,
      ),
    ),
  );
  byId('day-panel').setAttribute('aria-labelledby', `day-tab-${activeDay}`);
}

function selectDay(i: number, focus: boolean): void {
  activeDay = i;
  daySel.value = String(i);
  renderMeals();
  renderSide();
  if (focus) document.getElementById(`day-tab-${i}`)?.focus();
}

function nutrientsLine(n: Nutrients | undefined): string {
  if (!n) return '';
  return `P ${mg(n.phosphorusMg)} · absorbable ${range(n.absorbablePhosphorusMg)} · protein ${g(n.proteinG)}`;
}

function renderMeals(): void {
  fillAdderSelects();
  renderTabs();
  const day = draft.days[activeDay];
  const panel = byId('day-panel');
  if (!day) {
    fill(panel, h('p', { class: 'muted' }, 'This plan has no days yet.'));
    return;
  }
  const sDay = summaryDay(activeDay);
  fill(
    panel,
    day.occasions.map((o, j) => {
      const sOcc = sDay?.occasions[j];
      return h(
        'section',
        { class: 'occasion', 'aria-labelledby': `occ-h-${j}`, 'data-occasion': o.name },
        h(
          'header',
          {},
          h(
            'h3',
            { id: `occ-h-${j}` },
            o.name,
            o.time ? h('span', { class: 'muted' }, ` · ${o.time}`) : null,
          ),
          h(
            'span',
            { class: 'occ-total num', 'data-testid': 'occasion-total' },
            nutrientsLine(sOcc?.nutrients),
          ),
        ),
        o.items.length === 0
          ? h('p', { class: 'empty' }, 'No foods yet.')
          : h(
              'table',
              {},
              h(
                'thead',
                {},
                h(
                  'tr',
                  {},
                  h('th', {}, 'Food'),
                  h('th', {}, 'Quantity'),
                  h('th', { class: 'n' }, 'Phosphorus'),
                  h('th', { class: 'n' }, 'Absorbable'),
                  h('th', { class: 'n' }, 'Protein'),
                  h('th', {}, h('span', { class: 'visually-hidden' }, 'Actions')),
                ),
              ),
              h(
                'tbody',
                {},
                o.items.map((item, k) => {
                  const s = summaryItem(activeDay, j, k);
                  const ev = evidenceOf(s);
                  const name = foods.get(item.foodId)?.name ?? s?.name ?? `food ${item.foodId}`;
                  return h(
                    'tr',
                    { 'data-food-id': String(item.foodId) },
                    h(
                      'td',
                      {},
                      h('span', {}, name),
                      ' ',
                      ev.additive ? flagWithTip('additive', 'additive P', ev.lines) : null,
                      ' ',
                      ev.highRatio
                        ? flagWithTip('ratio', 'high ratio', [
                            `${ratio(s?.nutrients.phosphorusProteinRatioMgPerG)} phosphorus per gram of protein`,
                          ])
                        : null,
                    ),
                    quantityCell(activeDay, j, k, item),
                    h('td', { class: 'n num' }, mg(s?.nutrients.phosphorusMg)),
                    h('td', { class: 'n num' }, range(s?.nutrients.absorbablePhosphorusMg)),
                    h('td', { class: 'n num' }, g(s?.nutrients.proteinG)),
                    h(
                      'td',
                      {},
                      h(
                        'button',
                        {
                          type: 'button',
                          class: 'btn btn-small btn-quiet',
                          'aria-label': `Remove ${name} from ${o.name}`,
                          onclick: () => void commit(removeItem(draft, activeDay, j, k)),
                        },
                        'Remove',
                      ),
                    ),
                  );
                }),
              ),
            ),
      );
    }),
  );
}

// ---- side panel: totals against targets, binder schedule, contributors and swaps -------------

function targetOf(day: SummaryDay | undefined, key: string): Target | undefined {
  const t = day?.targets?.[key];
  return t && typeof t === 'object' ? (t as Target) : undefined;
}

function meter(
  label: string,
  value: number | null,
  unit: string,
  t: Target | undefined,
  extra?: HTMLElement | string | null,
): HTMLElement {
  const v = value ?? 0;
  const max = t?.max ?? null;
  const min = t?.min ?? null;
  const scale = Math.max(max ?? min ?? v, v, 1) * 1.15;
  let state = 'none';
  let stateText = 'no target';
  if (max !== null && v > max) [state, stateText] = ['over', 'over target'];
  else if (min !== null && v < min) [state, stateText] = ['under', 'under target'];
  else if (max !== null || min !== null) [state, stateText] = ['ok', 'within target'];
  const bar = h(
    'div',
    { class: `bar${state === 'over' ? ' over' : ''}`, role: 'presentation' },
    h('span', {}),
  );
  (bar.firstChild as HTMLElement).style.width = `${Math.min(100, (v / scale) * 100)}%`;
  const tText = t
    ? min !== null && max !== null
      ? `${fmtN(min)}–${fmtN(max)} ${unit}`
      : max !== null
        ? `< ${fmtN(max)} ${unit}`
        : min !== null
          ? `≥ ${fmtN(min)} ${unit}`
          : 'set by dietitian'
    : 'no target';
  return h(
    'div',
    { class: 'meter', 'data-meter': label },
    h(
      'div',
      { class: 'meter-head' },
      h(
        'span',
        {},
        h('strong', {}, label),
        ' ',
        h(
          'span',
          { class: 'num', 'data-testid': `total-${label}` },
          value === null ? '—' : `${fmtN(v)} ${unit}`,
        ),
      ),
      h('span', { class: `state state-${state}` }, stateText),
    ),
    bar,
    h(
      'div',
      { class: 'source' },
      `Target ${tText}${t?.setBy === 'dietitian' ? ' (set by the dietitian)' : ''}`,
      extra ? ' · ' : '',
      extra ?? '',
    ),
  );
}
function fmtN(n: number): string {
  return new Intl.NumberFormat('en', { maximumFractionDigits: 0 }).format(n);
}

function renderTotals(day: SummaryDay | undefined): void {
  const el = byId('day-totals');
  if (!day) {
    fill(el, h('p', { class: 'muted' }, 'No foods yet.'));
    return;
  }
  const n = day.nutrients;
  const abs = n.absorbablePhosphorusMg;
  fill(
    el,
    h('p', { class: 'small muted' }, `${day.label}: ${statusText(day.status)}`),
    meter(
      'Phosphorus',
      n.phosphorusMg,
      'mg',
      targetOf(day, 'phosphorusMg'),
      abs ? `absorbable ${range(abs)}, typical ${mg(abs.typical)}` : null,
    ),
    meter(
      'Protein',
      n.proteinG,
      'g',
      targetOf(day, 'proteinG'),
      n.phosphorusProteinRatioMgPerG !== null
        ? `ratio ${ratio(n.phosphorusProteinRatioMgPerG)}`
        : null,
    ),
    meter('Energy', n.energyKcal, 'kcal', targetOf(day, 'energyKcal')),
    meter('Sodium', n.sodiumMg, 'mg', targetOf(day, 'sodiumMg')),
    meter('Potassium', n.potassiumMg, 'mg', targetOf(day, 'potassiumMg')),
    h(
      'p',
      { class: 'small' },
      `Additive phosphorus ${mg(n.additivePhosphorusMg)} · calcium ${mg(n.calciumMg)} · energy ${kcal(n.energyKcal)}`,
    ),
  );
}

function statusText(status: unknown): string {
  if (typeof status === 'string') return status;
  if (status && typeof status === 'object') {
    const s = status as Record<string, unknown>;
    if (typeof s.overall === 'string') return s.overall;
    if (typeof s.summary === 'string') return s.summary;
    return Object.entries(s)
      .filter(([, v]) => typeof v === 'string')
      .map(([k, v]) => `${TARGET_NAMES[k] ?? k} ${String(v)}`)
      .join(' · ');
  }
  return '';
}

function dayKeyMatches(slot: BinderSlot, index: number, label: string): boolean {
  return (
    slot.day === label ||
    slot.day === index ||
    slot.day === index + 1 ||
    String(slot.day) === String(index + 1)
  );
}

function renderBinders(): void {
  const el = byId('binder-schedule');
  const b = summary?.binders;
  const label = draft.days[activeDay]?.label ?? '';
  if (!b || !b.prescription) {
    fill(
      el,
      h('p', { class: 'muted' }, 'No binder prescription on the patient record.'),
      plan ? h('a', { href: `/patients/${plan.patientId}` }, 'Record the prescription') : null,
    );
    return;
  }
  const slots = b.perOccasion.filter((s) => dayKeyMatches(s, activeDay, label));
  const notes = Array.isArray(b.disagreements)
    ? (b.disagreements as Array<{ message?: string }>)
    : [];
  fill(
    el,
    h('p', { class: 'small' }, prescriptionText(b.prescription)),
    slots.length === 0
      ? h('p', { class: 'muted' }, 'No occasion of this day needs a binder.')
      : slots.map((s) =>
          h(
            'div',
            { class: 'binder-row', 'data-testid': 'binder-slot' },
            h('span', {}, h('strong', {}, s.occasion)),
            h('span', { class: 'units num' }, `${s.units} ${s.units === 1 ? 'unit' : 'units'}`),
            h('span', { class: 'why' }, s.timing, s.reason ? ` — ${s.reason}` : ''),
          ),
        ),
    b.elementalCalciumMgPerDay
      ? h(
          'p',
          { class: 'small' },
          `Elemental calcium from binders ${mg(b.elementalCalciumMgPerDay)} per day (KDOQI 2003 limit 1,500 mg from binders).`,
        )
      : null,
    notes.length
      ? h(
          'ul',
          { class: 'swap-list' },
          notes.map((d) => h('li', {}, String(d.message ?? ''))),
        )
      : null,
  );
}

function prescriptionText(p: unknown): string {
  if (!p || typeof p !== 'object') return '';
  const r = p as Record<string, unknown>;
  const ing = String(r.ingredient ?? '').replaceAll('-', ' ');
  const per = r.schedule === 'per-meal' ? 'with each meal' : 'per day';
  return `Prescribed: ${ing} ${String(r.unitStrengthMg ?? '')} mg, ${String(r.units ?? '')} units ${per}.`;
}

function renderContributors(): void {
  const el = byId('contributors');
  const day = draft.days[activeDay];
  if (!day || !summary) {
    fill(el, h('p', { class: 'muted' }, 'Nothing yet.'));
    return;
  }
  const rows: Array<{
    name: string;
    foodId: number;
    occ: number;
    k: number;
    absMg: number;
    pMg: number;
  }> = [];
  day.occasions.forEach((o, j) =>
    o.items.forEach((it, k) => {
      const s = summaryItem(activeDay, j, k);
      rows.push({
        name: foods.get(it.foodId)?.name ?? `food ${it.foodId}`,
        foodId: it.foodId,
        occ: j,
        k,
        absMg: s?.nutrients.absorbablePhosphorusMg?.typical ?? 0,
        pMg: s?.nutrients.phosphorusMg ?? 0,
      });
    }),
  );
  rows.sort((a, b) => b.absMg - a.absMg);
  const top = rows.slice(0, 5);
  if (top.length === 0) {
    fill(el, h('p', { class: 'muted' }, 'Nothing yet.'));
    return;
  }
  fill(
    el,
    h(
      'ol',
      { class: 'list-plain' },
      top.map((r) =>
        h(
          'li',
          {},
          h(
            'div',
            { class: 'meter-head' },
            h('span', {}, r.name),
            h('span', { class: 'num' }, `${mg(r.absMg)} absorbable`),
          ),
          h(
            'button',
            {
              type: 'button',
              class: 'btn btn-small',
              'aria-label': `Find swaps for ${r.name}`,
              onclick: () => void showSwaps(r),
            },
            'Swaps',
          ),
        ),
      ),
    ),
  );
}

interface SwapJson {
  foodId?: number;
  id?: number;
  name: string;
  absorbableMgPerGProtein?: number | null;
  reason?: string;
  [k: string]: unknown;
}

async function showSwaps(r: {
  name: string;
  foodId: number;
  occ: number;
  k: number;
}): Promise<void> {
  const el = byId('swaps');
  fill(el, h('p', { class: 'muted' }, `Looking for swaps for ${r.name}…`));
  try {
    const res = await api<SwapJson[] | { swaps: SwapJson[] }>('GET', endpoints.swaps(r.foodId));
    const swaps = Array.isArray(res) ? res : res.swaps;
    fill(
      el,
      h('h3', {}, `Swaps for ${r.name}`),
      swaps.length === 0
        ? h(
            'p',
            { class: 'muted' },
            'No food of the same group carries clearly less absorbable phosphorus.',
          )
        : h(
            'ul',
            { class: 'swap-list' },
            swaps.map((s) => {
              const id = s.foodId ?? s.id ?? 0;
              return h(
                'li',
                {},
                s.name,
                s.reason ? h('span', { class: 'muted small' }, ` — ${s.reason}`) : null,
                ' ',
                h(
                  'button',
                  {
                    type: 'button',
                    class: 'btn btn-small',
                    'aria-label': `Use ${s.name} instead of ${r.name}`,
                    onclick: () => void useSwap(r, id, s.name),
                  },
                  'Use',
                ),
              );
            }),
          ),
      h(
        'p',
        { class: 'small muted' },
        'Swaps keep the weight of the food they replace; check the portion with the patient.',
      ),
    );
  } catch (err) {
    fill(el, h('p', { class: 'status error' }, `Swaps unavailable: ${errorText(err)}`));
  }
}

async function useSwap(r: { occ: number; k: number }, foodId: number, name: string): Promise<void> {
  const item = draft.days[activeDay]?.occasions[r.occ]?.items[r.k];
  if (!item) return;
  await loadFood(foodId, name);
  await commit(updateItem(draft, activeDay, r.occ, r.k, { foodId, measure: null }));
}

function renderSide(): void {
  renderTotals(summaryDay(activeDay));
  renderBinders();
  renderContributors();
}

// ---- days and occasions ----------------------------------------------------------------------

byId('add-day-btn').addEventListener('click', () => {
  activeDay = draft.days.length;
  void commit(addDay(draft));
});
byId<HTMLFormElement>('add-occasion-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const input = byId<HTMLInputElement>('new-occasion-name');
  const name = input.value.trim();
  if (!name) return;
  input.value = '';
  void commit(addOccasion(draft, activeDay, name));
});

// ---- start -----------------------------------------------------------------------------------

async function loadFood(id: number, name?: string): Promise<void> {
  if (foods.has(id)) return;
  try {
    const f = await api<FoodInfo>('GET', endpoints.food(id));
    foods.set(id, { id, name: f.name, portions: f.portions });
  } catch {
    foods.set(id, { id, name: name ?? `food ${id}`, portions: [] });
  }
}

async function start(): Promise<void> {
  try {
    plan = await api<PlanJson>('GET', endpoints.plan(planId));
  } catch (err) {
    fill(
      byId('day-panel'),
      h('p', { class: 'status error' }, `Could not open the plan: ${errorText(err)}`),
    );
    return;
  }
  draft = { name: plan.name, days: plan.days };
  byId('plan-h').textContent = plan.name;
  byId('crumb-plan').textContent = plan.name;
  const link = byId<HTMLAnchorElement>('crumb-patient-link');
  link.href = `/patients/${plan.patientId}`;
  link.textContent = 'Patient record';
  byId<HTMLAnchorElement>('handout-link').href = `/plans/${planId}/preview`;
  const ids = new Set(
    draft.days.flatMap((d) => d.occasions.flatMap((o) => o.items.map((i) => i.foodId))),
  );
  await Promise.all([...ids].map((id) => loadFood(id)));
  renderMeals();
  searchInput.focus();
  try {
    await refreshSummary();
  } catch (err) {
    setSaveState(`Totals unavailable: ${errorText(err)}`, true);
  }
}
void start();
