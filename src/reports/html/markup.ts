/**
 * Writing HTML safely: every string from the report passes through `text`
 * or an attribute value, both escaped; numbers in data attributes keep their
 * exact JSON value so totals can be read back by a machine.
 */
import { escapeXml } from '../svg/xml.js';

/** Escape text for an HTML element body or a double-quoted attribute (the XML entities are valid HTML). */
export function text(value: string): string {
  return escapeXml(value);
}

export type AttributeValue = string | number | boolean | null | undefined;

/** An element with escaped attributes and already-safe inner markup. `false`, null and undefined attributes are left out. */
export function tag(name: string, attributes: Record<string, AttributeValue>, inner = ''): string {
  const attrs = Object.entries(attributes)
    .filter(([, value]) => value !== undefined && value !== null && value !== false)
    .map(([key, value]) => (value === true ? ` ${key}` : ` ${key}="${escapeXml(String(value))}"`))
    .join('');
  return `<${name}${attrs}>${inner}</${name}>`;
}

/** A numeric cell that carries its raw value. */
export function numberCell(value: number | null, shown: string, extra: Record<string, AttributeValue> = {}): string {
  return tag('td', { class: 'num', 'data-value': value === null ? undefined : String(value), ...extra }, text(shown));
}

/** A total cell: `data-total` names it, `data-value` is String() of the exact number in the report. */
export function totalCell(key: string, value: number | null, shown: string, name: 'td' | 'th' = 'td'): string {
  return tag(
    name,
    { class: 'num total', 'data-total': key, 'data-value': value === null ? undefined : String(value) },
    text(shown),
  );
}

/** A header cell: plain text, or text with a numeric (right-aligned) column. */
export type HeadCell = string | { label: string; numeric?: boolean };

/**
 * A simple table: header cells (escaped), body rows and optional footer rows.
 * A row is a list of ready-made cells, or one string holding a complete `<tr>` (for rows with attributes).
 */
export function table(options: {
  className?: string;
  caption?: string;
  head: readonly HeadCell[];
  rows: readonly (readonly string[] | string)[];
  foot?: readonly string[][];
}): string {
  const head = options.head
    .map((h) =>
      typeof h === 'string'
        ? tag('th', { scope: 'col' }, text(h))
        : tag('th', { scope: 'col', class: h.numeric ? 'num' : undefined }, text(h.label)),
    )
    .join('');
  const body = options.rows.map((row) => (typeof row === 'string' ? row : tag('tr', {}, row.join('')))).join('\n');
  const foot =
    options.foot && options.foot.length > 0
      ? tag('tfoot', {}, options.foot.map((cells) => tag('tr', {}, cells.join(''))).join('\n'))
      : '';
  const caption = options.caption === undefined ? '' : tag('caption', {}, text(options.caption));
  return tag(
    'table',
    { class: options.className },
    `${caption}${tag('thead', {}, tag('tr', {}, head))}\n${tag('tbody', {}, body)}${foot}`,
  );
}

/** A plain cell with escaped text. */
export function cell(value: string, className?: string): string {
  return tag('td', { class: className }, text(value));
}

/** A definition list of label → already-safe value markup. */
export function facts(items: readonly [string, string][], className = 'facts'): string {
  return tag(
    'dl',
    { class: className },
    items.map(([label, value]) => `${tag('dt', {}, text(label))}${tag('dd', {}, value)}`).join(''),
  );
}

/** A `<code>` span for ids and hashes; class "hash" lets a long hash wrap anywhere. */
export function code(value: string, className?: string): string {
  return tag('code', { class: className }, text(value));
}
