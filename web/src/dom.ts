/**
 * A few lines instead of a view library: elements are built with h(), text
 * always goes in as text nodes (never parsed as markup), and the only markup
 * parsed is SVG that our own chart code wrote with every piece of text
 * escaped.
 */

type Child = Node | string | number | null | undefined | false;
type Attributes = Record<string, string | number | boolean | null | undefined | EventListener>;

export function h<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  attributes: Attributes = {},
  ...children: Child[]
): HTMLElementTagNameMap[K] {
  const element = document.createElement(tag);
  for (const [name, value] of Object.entries(attributes)) {
    if (value === null || value === undefined || value === false) continue;
    if (typeof value === 'function') element.addEventListener(name.replace(/^on/, ''), value);
    else if (value === true) element.setAttribute(name, '');
    else element.setAttribute(name, String(value));
  }
  append(element, ...children);
  return element;
}

export function append(parent: Node, ...children: Child[]): void {
  for (const child of children) {
    if (child === null || child === undefined || child === false) continue;
    parent.appendChild(
      typeof child === 'string' || typeof child === 'number' ? document.createTextNode(String(child)) : child,
    );
  }
}

/** Replace everything inside `parent`. */
export function replace(parent: Element, ...children: Child[]): void {
  parent.replaceChildren();
  append(parent, ...children);
}

/** SVG markup from our chart modules (all text escaped there) as a node. */
export function svg(markup: string): Element {
  const parsed = new DOMParser().parseFromString(markup, 'image/svg+xml');
  return document.importNode(parsed.documentElement, true);
}

let unique = 0;
/** An id for label/field pairs and aria references. */
export function newId(prefix: string): string {
  unique += 1;
  return `${prefix}-${unique}`;
}

/** A labelled form field: the label is always visible and tied to the control. */
export function field(
  label: string,
  control: HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement,
  hint?: string,
): HTMLElement {
  const id = control.id || newId('field');
  control.id = id;
  const hintId = hint ? `${id}-hint` : null;
  if (hintId) control.setAttribute('aria-describedby', hintId);
  return h(
    'div',
    { class: 'field' },
    h('label', { for: id }, label),
    control,
    hint ? h('p', { class: 'hint', id: hintId }, hint) : null,
  );
}

/** A table with a caption, header row and body rows. */
export function table(
  caption: string,
  headers: readonly string[],
  rows: readonly (readonly Child[])[],
  className = 'data',
): HTMLTableElement {
  return h(
    'table',
    { class: className },
    h('caption', {}, caption),
    h('thead', {}, h('tr', {}, ...headers.map((name) => h('th', { scope: 'col' }, name)))),
    h(
      'tbody',
      {},
      ...rows.map((cells) =>
        h('tr', {}, ...cells.map((cell) => (cell instanceof HTMLTableCellElement ? cell : h('td', {}, cell)))),
      ),
    ),
  );
}

/** A status message read out by screen readers when it changes. */
export function notice(kind: 'info' | 'error' | 'success', ...children: Child[]): HTMLElement {
  return h('div', { class: `notice notice-${kind}`, role: kind === 'error' ? 'alert' : 'status' }, ...children);
}
