import { api } from './api.js';
import { byId, errorText, fill, h, say } from './dom.js';
import { endpoints } from './endpoints.js';
import type { PlanSummary } from './summary-types.js';

/** A glossary entry as `GET /api/glossary` gives it. */
interface GlossaryEntry {
  foodId: number;
  language: string;
  name: string;
  status: 'drafted' | 'reviewed';
  origin: 'clinic' | 'starter';
}

/** The catalogue language of a sheet language choice ('zh' is the Simplified Chinese catalogue). */
export function glossaryLanguage(lang: string): string {
  return lang === 'zh' ? 'zh-Hans' : lang;
}

const RTL = new Set(['ar']);

/**
 * The Take-home sheet's "Food names" panel: one row per food of the plan, the name in the
 * sheet's language (the clinic's, else the drafted starter name), saved to the clinic's food
 * names; CSV export and import. `onSaved` re-renders the sheet.
 */
export function initFoodNames(
  planId: string,
  language: () => string,
  version: number | null,
  onSaved: () => Promise<void>,
): { refresh: () => Promise<void> } {
  const rows = byId('food-names-rows');
  const exportLink = byId<HTMLAnchorElement>('food-names-export');

  async function refresh(): Promise<void> {
    const lang = glossaryLanguage(language());
    exportLink.href = `/api/glossary.csv?language=${encodeURIComponent(lang)}`;
    try {
      const summary = await api<PlanSummary>(
        'GET',
        endpoints.planSummary(planId, version ?? undefined),
      );
      const foods = new Map<number, string>();
      for (const d of summary.days)
        for (const o of d.occasions) for (const i of o.items) foods.set(i.foodId, i.foodName);
      const ids = [...foods.keys()];
      const entries = ids.length
        ? await api<GlossaryEntry[]>(
            'GET',
            `/api/glossary?language=${encodeURIComponent(lang)}&foodIds=${ids.join(',')}`,
          )
        : [];
      fill(
        rows,
        [...foods].map(([foodId, tableName]) =>
          row(foodId, tableName, lang, entries.find((e) => e.foodId === foodId) ?? null),
        ),
      );
    } catch (err) {
      say('food-names-status', `Food names could not be loaded: ${errorText(err)}`, 'error');
    }
  }

  function row(foodId: number, tableName: string, lang: string, entry: GlossaryEntry | null) {
    const inputId = `food-name-${foodId}`;
    const input = h('input', {
      id: inputId,
      type: 'text',
      maxlength: 120,
      lang,
      dir: RTL.has(lang) ? 'rtl' : 'ltr',
      value: entry?.name ?? '',
      placeholder: 'no name yet: the table name prints',
      'data-food-id': foodId,
    });
    const status = h(
      'select',
      { 'aria-label': `Checked? ${tableName}` },
      h('option', { value: 'drafted' }, 'drafted'),
      h('option', { value: 'reviewed' }, 'checked'),
    );
    status.value = entry?.origin === 'clinic' ? entry.status : 'drafted';
    const save = h('button', { class: 'btn', type: 'button' }, 'Save');
    save.addEventListener('click', () => {
      void (async () => {
        const name = input.value.trim();
        if (!name) {
          say('food-names-status', `Type a name for "${tableName}" first.`, 'error');
          return;
        }
        try {
          await api('PUT', `/api/glossary/${foodId}/${encodeURIComponent(lang)}`, {
            name,
            status: status.value,
          });
          say('food-names-status', `Saved "${name}" for ${tableName}.`, 'ok');
          await onSaved();
          await refresh();
        } catch (err) {
          say('food-names-status', `Not saved: ${errorText(err)}`, 'error');
        }
      })();
    });
    const origin = entry ? (entry.origin === 'starter' ? ' (starter draft)' : '') : '';
    return h(
      'tr',
      {},
      h('td', {}, h('label', { for: inputId }, tableName), origin),
      h('td', {}, input),
      h('td', {}, status),
      h('td', {}, save),
    );
  }

  byId('food-names-import').addEventListener('click', () => {
    void (async () => {
      const file = byId<HTMLInputElement>('food-names-file').files?.[0];
      if (!file) {
        say('food-names-status', 'Choose a CSV file first.', 'error');
        return;
      }
      try {
        const r = await api<{ imported: number }>('POST', '/api/glossary/import', {
          csv: await file.text(),
        });
        say('food-names-status', `Imported ${r.imported} food name(s).`, 'ok');
        await onSaved();
        await refresh();
      } catch (err) {
        say('food-names-status', errorText(err), 'error');
      }
    })();
  });

  return { refresh };
}
