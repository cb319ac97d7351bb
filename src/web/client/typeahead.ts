import { api } from './api.js';
import { h } from './dom.js';
import { mg, ratio } from './format.js';

/** A search hit as `GET /api/foods?q=` returns it. */
export interface FoodHit {
  id: number;
  source: string;
  code: string;
  name: string;
  group: string | null;
  kind: 'generic' | 'branded';
  brandOwner: string | null;
  per100g: { phosphorusMg: number | null; proteinG: number | null };
  phosphorusProteinRatioMgPerG: number | null;
  portions: Array<{ id: number; description: string; grams: number }>;
}

export interface TypeaheadOptions {
  input: HTMLInputElement;
  list: HTMLUListElement;
  onPick(hit: FoodHit): void;
  limit?: number;
}

/**
 * The food finder (ARIA combobox with a listbox): results as you type, every keystroke cancels
 * the request before it, arrow keys move, Enter picks, Escape closes. After each render the
 * listbox carries `data-query` with the query it shows (the benchmark waits on it).
 */
export function attachTypeahead(opts: TypeaheadOptions): { clear(): void } {
  const { input, list } = opts;
  let hits: FoodHit[] = [];
  let active = -1;
  let inflight: AbortController | undefined;
  let seq = 0;
  // Answers already seen on this page (backspacing or retyping shows them at once).
  const seen = new Map<string, FoodHit[]>();

  const close = () => {
    list.hidden = true;
    input.setAttribute('aria-expanded', 'false');
    input.removeAttribute('aria-activedescendant');
    active = -1;
  };
  const highlight = (i: number) => {
    active = i;
    [...list.children].forEach((li, j) => li.setAttribute('aria-selected', String(j === i)));
    const li = list.children[i] as HTMLElement | undefined;
    if (li) {
      input.setAttribute('aria-activedescendant', li.id);
      li.scrollIntoView({ block: 'nearest' });
    }
  };
  const pick = (i: number) => {
    const hit = hits[i];
    if (!hit) return;
    close();
    opts.onPick(hit);
  };
  const render = (q: string) => {
    list.replaceChildren(
      ...hits.map((hit, i) =>
        h(
          'li',
          {
            id: `${list.id}-opt-${i}`,
            role: 'option',
            'aria-selected': 'false',
            onmousedown: (e: Event) => {
              e.preventDefault();
              pick(i);
            },
          },
          h(
            'span',
            { class: 'r-name' },
            hit.name,
            hit.kind === 'branded' && hit.brandOwner ? ` (${hit.brandOwner})` : '',
          ),
          h(
            'span',
            { class: 'r-meta muted' },
            `P ${mg(hit.per100g.phosphorusMg)}/100 g · ${ratio(hit.phosphorusProteinRatioMgPerG)}`,
          ),
        ),
      ),
    );
    if (hits.length === 0)
      list.append(
        h(
          'li',
          { role: 'option', 'aria-disabled': 'true', 'aria-selected': 'false' },
          'No food matches',
        ),
      );
    list.hidden = false;
    input.setAttribute('aria-expanded', 'true');
    list.dataset.query = q;
    if (hits.length > 0) highlight(0);
  };
  const search = async () => {
    const q = input.value.trim();
    inflight?.abort();
    const mine = ++seq;
    if (q.length === 0) {
      hits = [];
      close();
      list.dataset.query = '';
      return;
    }
    const known = seen.get(q);
    if (known) {
      hits = known;
      render(q);
      return;
    }
    inflight = new AbortController();
    try {
      const res = await api<FoodHit[]>(
        'GET',
        `/api/foods?q=${encodeURIComponent(q)}&limit=${opts.limit ?? 12}`,
        undefined,
        { signal: inflight.signal },
      );
      seen.set(q, res);
      if (mine !== seq) return;
      hits = res;
      render(q);
    } catch (err) {
      if ((err as Error).name === 'AbortError') return;
      hits = [];
      list.replaceChildren(
        h(
          'li',
          { role: 'option', 'aria-disabled': 'true', 'aria-selected': 'false' },
          `Search failed: ${(err as Error).message}`,
        ),
      );
      list.hidden = false;
    }
  };
  input.addEventListener('input', () => void search());
  input.addEventListener('keydown', (e) => {
    if (e.key === 'ArrowDown') {
      e.preventDefault();
      if (list.hidden && hits.length > 0) render(input.value.trim());
      else if (hits.length > 0) highlight(Math.min(active + 1, hits.length - 1));
    } else if (e.key === 'ArrowUp') {
      e.preventDefault();
      if (hits.length > 0) highlight(Math.max(active - 1, 0));
    } else if (e.key === 'Enter') {
      if (!list.hidden && active >= 0) {
        e.preventDefault();
        pick(active);
      }
    } else if (e.key === 'Escape') {
      close();
    }
  });
  input.addEventListener('blur', () => setTimeout(close, 120));
  return {
    clear() {
      input.value = '';
      hits = [];
      close();
    },
  };
}
