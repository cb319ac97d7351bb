/** A small element builder: text goes in as text nodes, never as HTML. */
type Child = Node | string | number | null | undefined | false;
type Attrs = Record<string, string | number | boolean | null | undefined | EventListener>;

export function h<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  attrs: Attrs = {},
  ...children: Array<Child | Child[]>
): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === null || v === undefined || v === false) continue;
    if (k.startsWith('on') && typeof v === 'function') el.addEventListener(k.slice(2), v);
    else if (k === 'class') el.className = String(v);
    else if (v === true) el.setAttribute(k, '');
    else el.setAttribute(k, String(v));
  }
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    el.append(c instanceof Node ? c : String(c));
  }
  return el;
}

export function byId<T extends HTMLElement = HTMLElement>(id: string): T {
  const el = document.getElementById(id);
  if (!el) throw new Error(`missing #${id}`);
  return el as T;
}

/** Replaces an element's children. */
export function fill(el: Element, ...children: Array<Child | Child[]>): void {
  el.replaceChildren();
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    el.append(c instanceof Node ? c : String(c));
  }
}

/** Writes a message into a role=status region. */
export function say(id: string, text: string, kind: 'ok' | 'error' | '' = ''): void {
  const el = document.getElementById(id);
  if (!el) return;
  el.textContent = text;
  el.className = `status ${kind}`.trim();
}

/** The route parameters the server rendered into `<main data-params>`. */
export function pageParams(): Record<string, string> {
  const raw = document.getElementById('main')?.dataset.params ?? '{}';
  return JSON.parse(raw) as Record<string, string>;
}

export function errorText(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}
