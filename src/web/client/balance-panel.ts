/**
 * The Plate ledger's balancing panel: asks the server to balance the day shown, shows the
 * proposal (only the changes, the day before and after, the binding limits with their prices,
 * and what the nearest plan misses when no plan meets every limit), and saves it as a new
 * version when the dietitian accepts. Keyboard: the review takes focus when it opens.
 */
import { api } from './api.js';
import { byId, errorText, fill, h, say } from './dom.js';
import { endpoints } from './endpoints.js';
import { g, kcal, mg } from './format.js';
import type { Nutrients } from './summary-types.js';

interface BalanceAnswer {
  status: 'optimal' | 'relaxed' | 'unchanged';
  before: Nutrients;
  after: Nutrients;
  changes: {
    day: number;
    occasion: string;
    foodName: string;
    gramsBefore: number;
    gramsAfter: number;
    measureBefore: string | null;
    measureAfter: string | null;
  }[];
  binding: { limit: string; price: number; unit: string; explanation: string }[];
  relaxed: { limit: string; by: number; unit: string; explanation: string }[];
  proposal: unknown;
  notes: string[];
  caution: string;
}

export interface BalancePanelHooks {
  planId: string;
  /** 0-based index of the day shown. */
  activeDay(): number;
  dayLabel(day: number): string;
  /** A past version is open: nothing may be balanced or saved. */
  readOnly: boolean;
  /** After a proposal is saved as a new version: reload the plan and its totals. */
  onAccepted(): Promise<void>;
}

const STATUS_TEXT: Record<BalanceAnswer['status'], string> = {
  optimal: 'Every limit met with the least absorbable phosphorus found.',
  relaxed: 'No plan within the allowed changes meets every limit: this is the nearest one.',
  unchanged: 'The day is already the best within the allowed changes.',
};

function amount(grams: number, measure: string | null, none: string): string {
  if (grams === 0) return none;
  return measure ? `${measure} (${g(grams, 0)})` : g(grams, 0);
}

function totalsTable(r: BalanceAnswer): HTMLElement {
  const rows: [string, (n: Nutrients) => string][] = [
    ['Absorbable phosphorus (typical)', (n) => mg(n.absorbablePhosphorusMg.typical)],
    ['Phosphorus', (n) => mg(n.phosphorusMg)],
    ['Protein', (n) => g(n.proteinG)],
    ['Energy', (n) => kcal(n.energyKcal)],
    ['Sodium', (n) => mg(n.sodiumMg)],
    ['Potassium', (n) => mg(n.potassiumMg)],
    ['Calcium', (n) => mg(n.calciumMg)],
  ];
  return h(
    'table',
    { class: 'balance-totals' },
    h('caption', {}, 'Day totals'),
    h(
      'thead',
      {},
      h(
        'tr',
        {},
        h('th', { scope: 'col' }, 'Nutrient'),
        h('th', { scope: 'col' }, 'Now'),
        h('th', { scope: 'col' }, 'Proposed'),
      ),
    ),
    h(
      'tbody',
      {},
      rows.map(([label, f]) =>
        h(
          'tr',
          {},
          h('th', { scope: 'row' }, label),
          h('td', {}, f(r.before)),
          h('td', { 'data-testid': 'balance-after' }, f(r.after)),
        ),
      ),
    ),
  );
}

function changesTable(r: BalanceAnswer): HTMLElement {
  if (r.changes.length === 0) return h('p', { class: 'muted' }, 'No changes.');
  return h(
    'table',
    { class: 'balance-changes' },
    h('caption', {}, 'Changes'),
    h(
      'thead',
      {},
      h(
        'tr',
        {},
        h('th', { scope: 'col' }, 'Occasion'),
        h('th', { scope: 'col' }, 'Food'),
        h('th', { scope: 'col' }, 'Now'),
        h('th', { scope: 'col' }, 'Proposed'),
      ),
    ),
    h(
      'tbody',
      {},
      r.changes.map((c) =>
        h(
          'tr',
          { 'data-testid': 'balance-change' },
          h('td', {}, c.occasion),
          h('td', {}, c.foodName),
          h('td', {}, amount(c.gramsBefore, c.measureBefore, 'new')),
          h('td', {}, amount(c.gramsAfter, c.measureAfter, 'removed')),
        ),
      ),
    ),
  );
}

function review(
  r: BalanceAnswer,
  dayLabel: string,
  accept: () => void,
  dismiss: () => void,
): HTMLElement[] {
  const out: HTMLElement[] = [
    h('h3', { id: 'balance-review-h', tabindex: '-1' }, `Proposal for ${dayLabel}`),
    h(
      'p',
      {
        class: r.status === 'relaxed' ? 'status error' : 'status ok',
        'data-testid': 'balance-verdict',
      },
      STATUS_TEXT[r.status],
    ),
    changesTable(r),
    totalsTable(r),
  ];
  if (r.binding.length > 0)
    out.push(
      h('h4', {}, 'Limits that hold the plan back'),
      h(
        'ul',
        { 'data-testid': 'balance-binding' },
        r.binding.map((b) => h('li', {}, b.explanation)),
      ),
    );
  if (r.relaxed.length > 0)
    out.push(
      h('h4', {}, 'Limits the nearest plan misses'),
      h(
        'ul',
        { 'data-testid': 'balance-relaxed' },
        r.relaxed.map((x) => h('li', {}, x.explanation)),
      ),
    );
  if (r.notes.length > 0)
    out.push(
      h(
        'ul',
        { class: 'muted small' },
        r.notes.map((n) => h('li', {}, n)),
      ),
    );
  out.push(
    h('p', { class: 'small' }, r.caution),
    h(
      'div',
      { class: 'balance-actions' },
      h(
        'button',
        {
          class: 'btn btn-primary',
          type: 'button',
          id: 'balance-accept',
          disabled: r.changes.length === 0,
          onclick: accept,
        },
        'Accept as a new version',
      ),
      h(
        'button',
        { class: 'btn btn-quiet', type: 'button', id: 'balance-dismiss', onclick: dismiss },
        'Dismiss',
      ),
    ),
  );
  return out;
}

/** Wires the panel's controls (the markup comes from the `balance-panel` partial). */
export function initBalancePanel(hooks: BalancePanelHooks): void {
  const run = byId<HTMLButtonElement>('balance-run');
  const robust = byId<HTMLInputElement>('balance-robust');
  const box = byId('balance-review');
  if (hooks.readOnly) {
    run.disabled = true;
    robust.disabled = true;
    return;
  }
  const close = () => {
    box.hidden = true;
    fill(box);
    run.focus();
  };
  run.addEventListener('click', async () => {
    const day = hooks.activeDay();
    run.disabled = true;
    say('balance-status', 'Balancing…');
    try {
      const r = await api<BalanceAnswer>('POST', endpoints.planBalance(hooks.planId), {
        day: day + 1,
        robust: robust.checked,
      });
      say('balance-status', '');
      const accept = async () => {
        byId<HTMLButtonElement>('balance-accept').disabled = true;
        say('balance-status', 'Saving…');
        try {
          const saved = await api<{ version: number }>(
            'PUT',
            endpoints.plan(hooks.planId),
            r.proposal,
          );
          close();
          await hooks.onAccepted();
          say('balance-status', `Saved as version ${saved.version}.`, 'ok');
        } catch (err) {
          say('balance-status', `Not saved: ${errorText(err)}`, 'error');
        }
      };
      fill(
        box,
        review(r, hooks.dayLabel(day), () => void accept(), close),
      );
      box.hidden = false;
      byId('balance-review-h').focus();
    } catch (err) {
      say('balance-status', `Could not balance: ${errorText(err)}`, 'error');
    } finally {
      run.disabled = false;
    }
  });
}
