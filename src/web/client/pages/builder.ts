import { api } from '../api.js';
import { initChrome } from '../chrome.js';
import { byId, errorText, fill, h, pageParams, say } from '../dom.js';
import { endpoints } from '../endpoints.js';
import { g, kcal, mg, range, ratio } from '../format.js';
import type { Target } from '../patient-types.js';
import {
  addDay,
  copyDay,
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
  Contributor,
  DaySummary as SummaryDay,
  ItemSummary as SummaryItem,
  Nutrients,
  PlanSummary,
  SwapResult,
  TargetCheck,
} from '../summary-types.js';
import { attachTypeahead, type FoodHit } from '../typeahead.js';
import type { TypicalUnit } from '../../../foods/unit-weights.js';
import { initBalancePanel } from '../balance-panel.js';

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
  /** Raw entries list the preparation methods that apply; cooked or unknown ones none. */
  cookedState?: 'raw' | 'cooked' | 'unknown';
  preparations?: { method: string; label: string }[];
  /** A typical unit weight (with its source) when the table gives grams only. */
  typicalUnit?: TypicalUnit | null;
}

const planId = pageParams().id ?? '';
/** A saved version opened from the version list (`?version=N`): shown as it was, not editable. */
const pastVersion = (() => {
  const v = Number(new URLSearchParams(location.search).get('version'));
  return Number.isInteger(v) && v > 0 ? v : null;
})();
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

/** The draft answer: the summary of the plan as edited, without a new version. */
interface DraftSaved {
  baseVersion: number;
  updatedAt: string;
  summary: PlanSummary;
}

const draftUrl = `/api/plans/${planId}/draft`;
/** Edits autosaved as a draft that no saved version holds yet, and how many. */
let draftPending = false;
let draftEdits = 0;

function draftState(): string {
  const since = plan?.version ? ` since version ${plan.version}` : '';
  return `Saved as a draft: ${draftEdits} ${draftEdits === 1 ? 'change' : 'changes'}${since}, not yet a version`;
}

/**
 * Every change is autosaved as the plan's draft and summed by the server; a version is kept
 * only when the dietitian saves (or opens the take-home sheet to print).
 */
async function commit(next: PlanDraft): Promise<void> {
  draft = next;
  dirty = true;
  renderMeals();
  setSaveState('Saving…');
  const mine = ++summarySeq;
  try {
    const saved = await api<DraftSaved>('PUT', draftUrl, toPlanInput(draft));
    if (mine !== summarySeq) return;
    dirty = false;
    draftPending = true;
    draftEdits++;
    byId<HTMLButtonElement>('save-version-btn').disabled = false;
    setSaveState(draftState());
    summary = saved.summary;
    renderMeals();
    renderSide();
  } catch (err) {
    if (mine === summarySeq) setSaveState(`Not saved: ${errorText(err)}`, true);
  }
}

/** Keeps the plan as edited as a new version (the draft becomes that version). */
async function saveVersion(): Promise<boolean> {
  const mine = ++summarySeq;
  setSaveState('Saving a version…');
  try {
    const saved = await api<PlanJson>('PUT', endpoints.plan(planId), toPlanInput(draft));
    plan = saved;
    draft = withResolvedBasis(draft, saved);
    draftPending = false;
    draftEdits = 0;
    dirty = false;
    byId<HTMLButtonElement>('save-version-btn').disabled = true;
    setSaveState(saved.version ? `Saved as version ${saved.version}` : 'Saved');
    await refreshSummary(mine);
    void renderVersions();
    return true;
  } catch (err) {
    setSaveState(`Not saved: ${errorText(err)}`, true);
    return false;
  }
}
byId('save-version-btn').addEventListener('click', () => void saveVersion());
// Printing keeps a version: the sheet is always the sheet of a saved version.
byId<HTMLAnchorElement>('handout-link').addEventListener('click', (e) => {
  if (!draftPending || pastVersion !== null) return;
  e.preventDefault();
  const href = byId<HTMLAnchorElement>('handout-link').href;
  void saveVersion().then((ok) => {
    if (ok) location.href = href;
  });
});

/** The editor's days rebuilt from a draft's summary (grams and measures as resolved). */
function draftFromSummary(name: string, s: PlanSummary): PlanDraft {
  return {
    name,
    days: s.days.map((d) => ({
      label: d.label,
      occasions: d.occasions.map((o) => ({
        name: o.name,
        kind: o.kind,
        time: o.time,
        items: o.items.map((i) => ({
          foodId: i.foodId,
          grams: i.grams,
          measure: i.measure ? { ...i.measure } : null,
          label: i.label === i.foodName ? null : i.label,
        })),
      })),
    })),
  };
}

/** Opens the unsaved draft left by an earlier visit, unless a version was saved after it. */
async function resumeDraft(): Promise<void> {
  let found: { input: unknown; stale: boolean; updatedAt: string };
  try {
    found = await api('GET', draftUrl);
  } catch {
    return; // no draft
  }
  if (found.stale) return;
  try {
    const saved = await api<DraftSaved>('PUT', draftUrl, found.input);
    summary = saved.summary;
    draft = draftFromSummary(draft.name, saved.summary);
    draftPending = true;
    byId<HTMLButtonElement>('save-version-btn').disabled = false;
    setSaveState(`Unsaved draft from ${savedAt(found.updatedAt)} (not yet a version)`);
  } catch {
    // A draft that no longer checks (a food removed by a re-import) is left; the version shows.
  }
}

/** Takes the weight basis the server chose (the larger reading) for items that did not say. */
function withResolvedBasis(d: PlanDraft, saved: PlanDraft): PlanDraft {
  return {
    ...d,
    days: d.days.map((day, i) => ({
      ...day,
      occasions: day.occasions.map((o, j) => ({
        ...o,
        items: o.items.map((it, k) => {
          const basis = saved.days[i]?.occasions[j]?.items[k]?.weightBasis;
          return it.preparation && !it.weightBasis && basis ? { ...it, weightBasis: basis } : it;
        }),
      })),
    })),
  };
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
  const food = foods.get(picked.id);
  // A typical unit (no measure of the table): grams only are saved, worked out from it.
  const t = food?.typicalUnit;
  if (measureSel.value === 'typical' && t) return { id: -1, description: t.unit, grams: t.grams };
  return food?.portions.find((m) => String(m.id) === measureSel.value) ?? null;
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
  const typical = measures.length === 0 ? foods.get(hit.id)?.typicalUnit : null;
  fill(
    measureSel,
    measures.map((m) => h('option', { value: String(m.id) }, measureText(m))),
    typical
      ? h(
          'option',
          { value: 'typical' },
          `${typical.unit}${typical.size ? `, ${typical.size}` : ''} (typical ${typical.grams} g each: ${typical.source})`,
        )
      : null,
    // A table with grams only: the box says so, so 2 means 2 g knowingly.
    h('option', { value: 'g' }, measures.length ? 'grams' : 'g (this food table gives grams only)'),
  );
  // A household measure is offered first when the table has one: it is what patients say.
  measureSel.value = measures[0] ? String(measures[0].id) : typical ? 'typical' : 'g';
  amountInput.value = measures[0] || typical ? '1' : '100';
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
    measure:
      measure && measure.id > 0
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

/** A flag's evidence: one short line for the tooltip, the rest behind "sources", by basis. */
interface FlagEvidence {
  additive: boolean;
  highRatio: boolean;
  /** The tooltip: one line about this item. */
  short: string;
  /** Figures for this item (its grams), one per line. */
  itemLines: string[];
  /** The food's profile: figures per 100 g as the table gives them, one per line. */
  per100gLines: string[];
}

function evidenceOf(item: SummaryItem | undefined): FlagEvidence {
  if (!item) {
    return { additive: false, highRatio: false, short: '', itemLines: [], per100gLines: [] };
  }
  const found = summary?.flags.additiveFoods.find((f) => f.foodId === item.foodId);
  const additiveMg = item.nutrients.additivePhosphorusMg;
  const itemLines = [
    ...(additiveMg ? [`Additive phosphorus: about ${mg(additiveMg)}`] : []),
    `Phosphorus split by: ${item.splitMethod}`,
  ];
  const short = additiveMg
    ? `Phosphate additives likely: about ${mg(additiveMg)} in this ${fmtN(item.grams)} g.`
    : 'Phosphate additives likely in this food.';
  return {
    additive: item.flags.additive,
    highRatio: item.flags.highRatio,
    short,
    itemLines,
    per100gLines: [...(found?.evidence ?? [])],
  };
}

let tipSeq = 0;
/** A flag with a one-line tooltip and, when there is more, a "sources" disclosure beside it. */
function flagWithTip(
  kind: 'additive' | 'ratio',
  text: string,
  short: string,
  more: { heading: string; lines: string[] }[] = [],
): HTMLElement {
  const id = `tip-${++tipSeq}`;
  const flag = h(
    'span',
    { class: `flag flag-${kind} has-tip`, tabindex: '0', 'aria-describedby': id },
    text,
    h('span', { class: 'tip', role: 'tooltip', id }, short),
  );
  const groups = more.filter((g) => g.lines.length > 0);
  if (groups.length === 0) return flag;
  return h(
    'span',
    { class: 'flag-with-sources' },
    flag,
    h(
      'details',
      { class: 'sources' },
      h('summary', {}, 'sources'),
      h(
        'div',
        { class: 'sources-body' },
        groups.flatMap((g) => [
          h('p', { class: 'sources-basis' }, g.heading),
          h(
            'ul',
            {},
            g.lines.map((l) => h('li', {}, l)),
          ),
        ]),
      ),
    ),
  );
}

/** The patient's own words for the item (what the take-home sheet prints instead of the name). */
function wordsInput(
  day: number,
  occ: number,
  k: number,
  item: DraftItem,
  name: string,
): HTMLElement {
  const input = h('input', {
    type: 'text',
    class: 'words',
    maxlength: '120',
    value: item.label ?? '',
    placeholder: 'patient’s words (optional)',
    'aria-label': `Patient’s own words for ${name}`,
    'data-focus-key': `words-${day}-${occ}-${k}`,
    autocomplete: 'off',
  });
  const apply = () => {
    const label = input.value.trim();
    if ((item.label ?? '') === label) return;
    void commit(updateItem(draft, day, occ, k, { label: label || null }));
  };
  input.addEventListener('change', apply);
  input.addEventListener('keydown', (e) => {
    if ((e as KeyboardEvent).key === 'Enter') {
      e.preventDefault();
      apply();
    }
  });
  return h('div', {}, input);
}

/**
 * How the item is cooked: "as listed" or a method of the preparation table that applies to the
 * food, and (with a method) which weight the quantity is. Native selects, so the keyboard works
 * as everywhere (Tab to it, arrows or letters to choose).
 */
function preparationCell(
  day: number,
  occ: number,
  k: number,
  item: DraftItem,
  name: string,
  shown: SummaryItem | undefined,
): HTMLElement {
  const food = foods.get(item.foodId);
  const chosen = item.preparation ?? 'as-listed';
  const known = food?.preparations ?? [];
  // Until the food's methods arrive, the item's own method stands in for them.
  const offered =
    chosen !== 'as-listed' && !known.some((m) => m.method === chosen)
      ? [...known, { method: chosen, label: shown?.preparation?.label ?? chosen }]
      : known;
  const stateNote =
    food?.cookedState === 'cooked'
      ? 'already cooked in the table: no preparation factor'
      : food?.cookedState === 'unknown'
        ? 'the table does not say raw: no preparation factor'
        : null;
  const sel = h(
    'select',
    {
      class: 'prep',
      'aria-label': `Preparation of ${name}`,
      'data-focus-key': `prep-${day}-${occ}-${k}`,
      title: stateNote ?? 'how the food is cooked',
    },
    h('option', { value: 'as-listed', selected: chosen === 'as-listed' }, 'as listed'),
    offered.map((m) => h('option', { value: m.method, selected: m.method === chosen }, m.label)),
  ) as HTMLSelectElement;
  sel.addEventListener('change', () => {
    const method = sel.value === 'as-listed' ? null : sel.value;
    // A household measure weighs the food as listed; typed grams keep the basis chosen, else
    // the server reads them the way that gives the larger amounts (shown once saved).
    const basis = item.measure ? 'table' : item.weightBasis;
    const next: DraftItem = {
      foodId: item.foodId,
      grams: item.grams,
      measure: item.measure,
      ...(item.label !== undefined ? { label: item.label } : {}),
      preparation: method,
      ...(method && basis ? { weightBasis: basis } : {}),
    };
    void commit(replaceItem(draft, day, occ, k, next));
  });
  const parts: (HTMLElement | string)[] = [sel];
  if (chosen !== 'as-listed') {
    const basis = h(
      'select',
      {
        class: 'prep-basis',
        'aria-label': `Weight of ${name} is`,
        'data-focus-key': `basis-${day}-${occ}-${k}`,
      },
      h('option', { value: 'table', selected: item.weightBasis === 'table' }, 'raw weight'),
      h('option', { value: 'plate', selected: item.weightBasis !== 'table' }, 'plate weight'),
    ) as HTMLSelectElement;
    basis.addEventListener('change', () => {
      void commit(
        updateItem(draft, day, occ, k, {
          weightBasis: basis.value === 'plate' ? 'plate' : 'table',
        }),
      );
    });
    parts.push(' ', basis);
    const p = shown?.preparation;
    if (p)
      parts.push(
        h(
          'span',
          { class: 'prep-note', title: p.sources.join('\n') },
          ` ${p.tableGrams} g raw = ${p.plateGrams} g cooked; P x${p.factors?.phosphorus.typical ?? 1}, K x${p.factors?.potassium.typical ?? 1}`,
        ),
      );
  } else if (stateNote && offered.length === 0) {
    parts.push(h('span', { class: 'prep-note' }, ` ${stateNote}`));
  }
  return h('div', { class: 'prep-cell' }, parts);
}

function quantityCell(day: number, occ: number, k: number, item: DraftItem): HTMLElement {
  const food = foods.get(item.foodId);
  // Until the food's measures arrive, the item's own measure stands in for them.
  const own = item.measure;
  const measures: Measure[] =
    food?.portions ??
    (own && own.gramsPerUnit
      ? [
          {
            id: own.portionId,
            description: own.description ?? 'measure',
            grams: own.gramsPerUnit,
            amount: 1,
          },
        ]
      : []);
  const measure = measures.find((m) => m.id === item.measure?.portionId) ?? null;
  const name = food?.name ?? `food ${item.foodId}`;
  const input = h('input', {
    type: 'number',
    min: '0.1',
    step: 'any',
    value: String(measure ? (item.measure?.count ?? 1) : item.grams),
    'aria-label': `Quantity of ${name} in ${measure ? measure.description : 'grams'}`,
    'data-focus-key': `qty-${day}-${occ}-${k}`,
    inputmode: 'decimal',
  });
  const sel = h(
    'select',
    {
      'aria-label': `Measure for ${name}`,
      'data-focus-key': `measure-${day}-${occ}-${k}`,
      title: measure ? measureText(measure) : 'grams',
    },
    measures.map((m) =>
      h(
        'option',
        { value: String(m.id), selected: m.id === item.measure?.portionId },
        // Short in the row, where the column is narrow: "slice · 29 g".
        `${m.description} · ${gramsFor(1, m)} g`,
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
  fillCopyTargets();
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
  const focusKey = (document.activeElement as HTMLElement | null)?.dataset?.focusKey;
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
                  const name = foods.get(item.foodId)?.name ?? s?.foodName ?? `food ${item.foodId}`;
                  return h(
                    'tr',
                    { 'data-food-id': String(item.foodId) },
                    h(
                      'td',
                      {},
                      h('span', {}, name),
                      ' ',
                      ev.additive
                        ? flagWithTip('additive', 'additive P', ev.short, [
                            {
                              heading: `This item (${fmtN(s?.grams ?? 0)} g)`,
                              lines: ev.itemLines,
                            },
                            { heading: 'The food, per 100 g', lines: ev.per100gLines },
                          ])
                        : null,
                      ' ',
                      ev.highRatio
                        ? flagWithTip(
                            'ratio',
                            'high ratio',
                            `${ratio(s?.nutrients.phosphorusProteinRatioMgPerG)} phosphorus per gram of protein (the food, any amount).`,
                          )
                        : null,
                      wordsInput(activeDay, j, k, item, name),
                      preparationCell(activeDay, j, k, item, name, s),
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
                          onclick: () => {
                            void commit(removeItem(draft, activeDay, j, k));
                            searchInput.focus();
                          },
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
  // A saved version is read, not changed: its quantity, word and remove controls are shown off.
  if (pastVersion !== null) {
    for (const el of panel.querySelectorAll<HTMLInputElement | HTMLButtonElement>(
      'input, select, button',
    ))
      el.disabled = true;
  }
  // Re-rendering replaces the rows: give focus back to the control that had it.
  if (focusKey) panel.querySelector<HTMLElement>(`[data-focus-key="${focusKey}"]`)?.focus();
}

// ---- side panel: totals against targets, binder schedule, contributors and swaps -------------

const CHECK_NAMES: Record<string, [string, string]> = {
  phosphorusMg: ['Phosphorus', 'mg'],
  proteinG: ['Protein', 'g'],
  energyKcal: ['Energy', 'kcal'],
  sodiumMg: ['Sodium', 'mg'],
  potassiumMg: ['Potassium', 'mg'],
};
const STATE_TEXT: Record<string, [string, string]> = {
  within: ['ok', 'within target'],
  above: ['over', 'over target'],
  below: ['under', 'under target'],
  'not-set': ['none', 'no target set'],
};

function fmtN(n: number): string {
  return new Intl.NumberFormat('en', { maximumFractionDigits: 0 }).format(n);
}

/** One target line: the value against the range, with the server's verdict (never our own). */
function meter(check: TargetCheck, target: Target | undefined, extra: string | null): HTMLElement {
  const [label, unit] = CHECK_NAMES[check.target] ?? [check.target, check.unit];
  const v = check.value;
  const scale = Math.max(check.max ?? check.min ?? v, v, 1) * 1.15;
  const [state, stateText] = STATE_TEXT[check.status] ?? ['none', check.status];
  const bar = h('div', { class: `bar${state === 'over' ? ' over' : ''}` }, h('span', {}));
  (bar.firstChild as HTMLElement).style.width = `${Math.min(100, (v / scale) * 100)}%`;
  const range =
    check.min !== null && check.max !== null
      ? `${fmtN(check.min)}–${fmtN(check.max)} ${unit}`
      : check.max !== null
        ? `under ${fmtN(check.max)} ${unit}`
        : check.min !== null
          ? `at least ${fmtN(check.min)} ${unit}`
          : 'set by the dietitian';
  return h(
    'div',
    { class: 'meter', 'data-meter': check.target },
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
          { class: 'num', 'data-testid': `total-${check.target}` },
          `${check.incomplete ? '≥ ' : ''}${fmtN(v)} ${unit}`,
        ),
      ),
      h('span', { class: `state state-${state}` }, stateText),
    ),
    bar,
    h(
      'div',
      { class: 'source' },
      `Target ${range}${target?.setBy === 'dietitian' ? ' (set by the dietitian)' : ''}`,
      extra ? ` · ${extra}` : '',
      check.incomplete ? ' · some foods lack this value: the total is a lower bound' : '',
    ),
  );
}

function renderTotals(day: SummaryDay | undefined): void {
  const el = byId('day-totals');
  if (!day) {
    fill(el, h('p', { class: 'muted' }, 'No foods yet.'));
    return;
  }
  const n = day.nutrients;
  const abs = n.absorbablePhosphorusMg;
  const extras: Record<string, string | null> = {
    phosphorusMg: `absorbable ${range(abs)} (typical ${mg(abs.typical)})`,
    proteinG:
      n.phosphorusProteinRatioMgPerG !== null
        ? `phosphorus-to-protein ratio ${ratio(n.phosphorusProteinRatioMgPerG)}`
        : null,
  };
  fill(
    el,
    h(
      'p',
      { class: 'small' },
      h(
        'span',
        { class: `state ${day.status.level === 'on-target' ? 'state-ok' : 'state-under'}` },
        day.status.level === 'on-target' ? 'on target' : 'needs attention',
      ),
      ` ${day.label}`,
    ),
    day.status.checks.map((c) => meter(c, day.targets[c.target], extras[c.target] ?? null)),
    h(
      'p',
      { class: 'small' },
      `Additive phosphorus ${mg(n.additivePhosphorusMg)} · calcium ${mg(n.calciumMg)} · energy ${kcal(n.energyKcal)}`,
    ),
    day.status.messages.length
      ? h(
          'ul',
          { class: 'swap-list small' },
          day.status.messages.map((m) => h('li', {}, m)),
        )
      : null,
  );
}

function renderBinders(): void {
  const el = byId('binder-schedule');
  const b = summary?.binders;
  const label = draft.days[activeDay]?.label ?? '';
  if (!b || !b.prescription || !b.ingredient) {
    fill(
      el,
      h(
        'p',
        { class: 'muted' },
        'No binder prescription was on the record when this version was saved.',
      ),
      plan ? h('a', { href: `/patients/${plan.patientId}` }, 'Record the prescription') : null,
    );
    return;
  }
  const p = b.prescription;
  const slots = b.perOccasion.filter((s) => s.day === label);
  const dayInfo = b.days.find((d) => d.day === label);
  fill(
    el,
    h(
      'p',
      { class: 'small' },
      `Prescribed: ${b.ingredient.displayName}, ${p.unitStrengthMg} mg a unit, ${p.units} ${p.units === 1 ? 'unit' : 'units'} ${p.schedule === 'per-meal' ? 'with each meal' : 'per day'}.`,
    ),
    slots.length === 0
      ? h('p', { class: 'muted' }, 'No occasion of this day gets a binder.')
      : slots.map((s) =>
          h(
            'div',
            { class: 'binder-row', 'data-testid': 'binder-slot' },
            h(
              'span',
              {},
              h('strong', {}, s.occasion),
              s.time ? h('span', { class: 'muted' }, ` ${s.time}`) : null,
              h(
                'span',
                { class: 'muted small' },
                ` · ${mg(s.absorbablePhosphorusMgTypical)} absorbable`,
              ),
            ),
            h('span', { class: 'units num' }, `${s.units} ${s.units === 1 ? 'unit' : 'units'}`),
            s.units > 0 ? h('span', { class: 'why' }, s.timing) : null,
            h(
              'details',
              {},
              h('summary', {}, `Why ${s.units} ${s.units === 1 ? 'unit' : 'units'}`),
              s.reason,
            ),
          ),
        ),
    dayInfo
      ? h(
          'p',
          { class: 'small' },
          `${dayInfo.distributedUnits} of ${dayInfo.prescribedUnits} prescribed units placed. Elemental calcium from binders ${mg(dayInfo.elementalCalciumMgFromBinders)}, with food ${mg(dayInfo.elementalCalciumMgTotal)} (limits ${fmtN(b.limits.fromBindersMaxMg)} mg and ${fmtN(b.limits.totalMaxMg)} mg, ${b.limits.source}).`,
        )
      : null,
    dayInfo && dayInfo.disagreements.length
      ? h(
          'ul',
          { class: 'swap-list' },
          dayInfo.disagreements.map((d) => h('li', {}, d.message)),
        )
      : null,
    b.ingredient.warnings.length
      ? h(
          'ul',
          { class: 'swap-list' },
          b.ingredient.warnings.map((w) => h('li', {}, w)),
        )
      : null,
    h('p', { class: 'source' }, b.roundingRule),
  );
}

function renderContributors(): void {
  const el = byId('contributors');
  const top = summaryDay(activeDay)?.topContributors ?? [];
  if (top.length === 0) {
    fill(el, h('p', { class: 'muted' }, 'Nothing yet.'));
    return;
  }
  fill(
    el,
    h(
      'ol',
      { class: 'list-plain' },
      top.map((c) =>
        h(
          'li',
          {},
          h('div', {}, c.name),
          h(
            'div',
            { class: 'small muted' },
            `${mg(c.absorbablePhosphorusMgTypical)} absorbable · ${Math.round(c.share * 100)} % of the day’s phosphorus `,
          ),
          h(
            'button',
            {
              type: 'button',
              class: 'btn btn-small',
              'aria-label': `Find swaps for ${c.name}`,
              onclick: () => void showSwaps(c),
            },
            'Swaps',
          ),
        ),
      ),
    ),
  );
}

async function showSwaps(c: Contributor): Promise<void> {
  const el = byId('swaps');
  fill(el, h('p', { class: 'muted' }, `Looking for swaps for ${c.name}…`));
  try {
    const res = await api<SwapResult>('GET', endpoints.swaps(c.foodId));
    fill(
      el,
      h('h3', {}, `Swaps for ${c.name}`),
      res.swaps.length === 0
        ? h(
            'p',
            { class: 'muted' },
            'No food of the same group carries clearly less absorbable phosphorus.',
          )
        : h(
            'ul',
            { class: 'swap-list' },
            res.swaps.map((s) =>
              h(
                'li',
                {},
                s.name,
                h(
                  'span',
                  { class: 'muted small' },
                  ` — ${s.sameKind ? 'same kind of food, ' : ''}${Math.round(s.shareOfOriginal * 100)} % of the original's absorbable phosphorus ${res.basis === 'per-g-protein' ? 'per g protein' : 'per portion'}; ${s.proteinOrigin} protein`,
                ),
                ...s.cautions.map((text) => h('span', { class: 'caution small' }, ` ${text}`)),
                ' ',
                h(
                  'button',
                  {
                    type: 'button',
                    class: 'btn btn-small',
                    'aria-label': `Use ${s.name} instead of ${c.name}`,
                    onclick: () => void useSwap(c.foodId, s.foodId, s.name),
                  },
                  'Use',
                ),
              ),
            ),
          ),
      preparedSwapLine(c, res),
      ...(res.cautioned.length > 0
        ? [
            h('h4', {}, 'Only with a caution'),
            h(
              'ul',
              { class: 'swap-list' },
              res.cautioned.map((s) => h('li', {}, s.name, ` — ${s.cautions.join(' ')}`)),
            ),
          ]
        : []),
      h('p', { class: 'source' }, res.rule),
      h(
        'p',
        { class: 'small muted' },
        'A swap keeps the weight of the food it replaces; check the portion with the patient.',
      ),
    );
  } catch (err) {
    fill(el, h('p', { class: 'status error' }, `Swaps unavailable: ${errorText(err)}`));
  }
}

/** "Same food, boiled and drained": the swap is the method, applied to the food's items. */
function preparedSwapLine(c: Contributor, res: SwapResult): HTMLElement | null {
  const p = res.prepared;
  if (!p) return null;
  return h(
    'p',
    { class: 'swap-prepared' },
    `Same food, ${p.label.toLowerCase()}`,
    h(
      'span',
      { class: 'muted small' },
      ` — ${Math.round(p.shareOfOriginal * 100)} % of its absorbable phosphorus ${res.basis === 'per-g-protein' ? 'per g protein' : 'per portion'}`,
    ),
    ' ',
    h(
      'button',
      {
        type: 'button',
        class: 'btn btn-small',
        title: p.sources.join('\n'),
        'aria-label': `Cook ${c.name}: ${p.label}`,
        onclick: () => void usePreparation(c.foodId, p.method),
      },
      'Use',
    ),
  );
}

/** The plan with one item replaced whole (so a field can be dropped, not only changed). */
function replaceItem(
  d: PlanDraft,
  day: number,
  occ: number,
  k: number,
  item: DraftItem,
): PlanDraft {
  return {
    ...d,
    days: d.days.map((x, i) =>
      i !== day
        ? x
        : {
            ...x,
            occasions: x.occasions.map((o, j) =>
              j !== occ ? o : { ...o, items: o.items.map((it, n) => (n === k ? item : it)) },
            ),
          },
    ),
  };
}

/** Sets the method on every item of the food in the shown day that has none yet. */
async function usePreparation(foodId: number, method: string): Promise<void> {
  let next = draft;
  draft.days[activeDay]?.occasions.forEach((o, j) => {
    o.items.forEach((it, k) => {
      if (it.foodId === foodId && !it.preparation)
        // Typed grams: the server reads them the way that gives the larger amounts.
        next = updateItem(
          next,
          activeDay,
          j,
          k,
          it.measure ? { preparation: method, weightBasis: 'table' } : { preparation: method },
        );
    });
  });
  await commit(next);
}

/** Replaces every item of the food in the shown day, keeping each item's weight in grams. */
async function useSwap(fromId: number, toId: number, name: string): Promise<void> {
  await loadFood(toId, name);
  let next = draft;
  next.days[activeDay]?.occasions.forEach((o, j) =>
    o.items.forEach((it, k) => {
      if (it.foodId === fromId)
        next = updateItem(next, activeDay, j, k, { foodId: toId, measure: null });
    }),
  );
  fill(byId('swaps'), h('p', { class: 'status ok' }, `${name} is in the plan now.`));
  await commit(next);
}

function renderSide(): void {
  renderTotals(summaryDay(activeDay));
  // A User Timing mark the benchmark reads: when the day's totals are on screen.
  if (summary && performance.getEntriesByName('phl-totals').length === 0)
    performance.mark('phl-totals');
  renderBinders();
  renderContributors();
}

// ---- days and occasions ----------------------------------------------------------------------

/** The "copy this day" choices: every other day, each day, or a new day. */
function fillCopyTargets(): void {
  const others = draft.days.map((d, i) => ({ d, i })).filter((x) => x.i !== activeDay);
  fill(
    byId('copy-day-to'),
    others.length > 1 ? h('option', { value: 'others' }, 'every other day') : null,
    others.map((x) => h('option', { value: String(x.i) }, x.d.label)),
    h('option', { value: 'new' }, 'a new day'),
  );
}
byId<HTMLFormElement>('copy-day-form').addEventListener('submit', (e) => {
  e.preventDefault();
  const choice = byId<HTMLSelectElement>('copy-day-to').value || 'new';
  const others = draft.days.map((_, i) => i).filter((i) => i !== activeDay);
  const to = choice === 'new' ? 'new' : choice === 'others' ? others : [Number(choice)];
  const next = copyDay(draft, activeDay, to);
  if (to === 'new') activeDay = next.days.length - 1;
  void commit(next);
});

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

// ---- saved versions --------------------------------------------------------------------------

interface VersionInfo {
  version: number;
  name: string;
  note: string | null;
  createdAt: string;
  days: number;
}

function savedAt(iso: string): string {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short' }).format(
    new Date(iso),
  );
}

/** Every saved version, newest first; the one on screen is marked, the others open read-only. */
async function renderVersions(): Promise<void> {
  const list = byId('version-list');
  let versions: VersionInfo[];
  try {
    versions = await api<VersionInfo[]>('GET', endpoints.planVersions(planId));
  } catch (err) {
    fill(list, h('li', { class: 'status error' }, `Versions unavailable: ${errorText(err)}`));
    return;
  }
  const latest = versions.at(-1)?.version ?? null;
  const shown = pastVersion ?? latest;
  fill(
    list,
    [...versions].reverse().map((v) => {
      const label = `Version ${v.version}${v.version === latest ? ' (current)' : ''}`;
      const detail = ` · ${savedAt(v.createdAt)} · ${v.days} ${v.days === 1 ? 'day' : 'days'}${v.note ? ` · ${v.note}` : ''}`;
      const href =
        v.version === latest ? `/plans/${planId}` : `/plans/${planId}?version=${v.version}`;
      // A plain list: the label carries the number (a numbered list counted down to "0.").
      return h(
        'li',
        {},
        v.version === shown
          ? h('strong', { 'aria-current': 'page' }, label)
          : h('a', { href }, label),
        h('span', { class: 'muted small' }, detail),
      );
    }),
  );
}

/** The banner and the hidden editing tools of a saved version opened read-only. */
function showPastVersion(p: PlanJson & { savedAt?: string }): void {
  byId('past-banner').hidden = false;
  byId('past-title').textContent =
    `Version ${p.version ?? pastVersion}, as saved${p.savedAt ? ` ${savedAt(p.savedAt)}` : ''}.`;
  byId('past-text').textContent =
    'Saved versions do not change, so this one cannot be edited; the totals are those it froze.';
  byId<HTMLAnchorElement>('past-current-link').href = `/plans/${planId}`;
  for (const sel of ['.adder', '.day-tools']) {
    const el = document.querySelector<HTMLElement>(sel);
    if (el) el.hidden = true;
  }
}

// ---- start -----------------------------------------------------------------------------------

async function loadFood(id: number, name?: string): Promise<void> {
  if (foods.has(id)) return;
  try {
    const f = await api<FoodInfo>('GET', endpoints.food(id));
    foods.set(id, {
      id,
      name: f.name,
      portions: f.portions,
      cookedState: f.cookedState ?? 'unknown',
      preparations: f.preparations ?? [],
      typicalUnit: f.typicalUnit ?? null,
    });
  } catch {
    foods.set(id, { id, name: name ?? `food ${id}`, portions: [] });
  }
}

async function start(): Promise<void> {
  // The summary is asked for at once, beside the plan: the totals need no other request.
  const summaryP = api<PlanSummary>(
    'GET',
    endpoints.planSummary(planId, pastVersion ?? undefined),
  ).then(
    (v) => ({ ok: true as const, v }),
    (err: unknown) => ({ ok: false as const, err }),
  );
  try {
    plan = await api<PlanJson>(
      'GET',
      pastVersion === null ? endpoints.plan(planId) : endpoints.planVersion(planId, pastVersion),
    );
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
  byId<HTMLAnchorElement>('handout-link').href =
    `/plans/${planId}/preview${pastVersion === null ? '' : `?version=${pastVersion}`}`;
  if (pastVersion !== null) showPastVersion(plan);
  else await resumeDraft();
  void renderVersions();
  const ids = new Set(
    draft.days.flatMap((d) => d.occasions.flatMap((o) => o.items.map((i) => i.foodId))),
  );
  // Household measures of the foods already in the plan arrive in the background.
  const foodsP = Promise.all([...ids].map((id) => loadFood(id)));
  if (pastVersion === null) searchInput.focus();
  const res = await summaryP;
  // A resumed draft already has its own summary.
  if (!res.ok) setSaveState(`Totals unavailable: ${errorText(res.err)}`, true);
  else if (!draftPending) summary = res.v;
  renderMeals();
  renderSide();
  await foodsP;
  if (!byId('day-panel').contains(document.activeElement)) renderMeals();
}
void start();

initBalancePanel({
  planId,
  activeDay: () => activeDay,
  dayLabel: (d) => draft.days[d]?.label ?? `day ${d + 1}`,
  readOnly: pastVersion !== null,
  onAccepted: start,
});
