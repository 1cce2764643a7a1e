/** Writing SVG text safely: every piece of user text is escaped, every number is finite and short. */

const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Escape text for an XML element body or a double-quoted attribute. */
export function escapeXml(text: string): string {
  // Characters XML 1.0 forbids outright (C0 controls other than tab, LF, CR) are dropped.
  return text.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f]/g, '').replace(/[&<>"']/g, (c) => ENTITIES[c]!);
}

/** Coordinates are held within ±COORDINATE_LIMIT pixels: far outside any chart, yet always written as a plain decimal. */
const COORDINATE_LIMIT = 1e6;

/** A coordinate with at most two decimals (sub-pixel precision is invisible and bloats the file); always finite. */
export function coord(value: number): string {
  if (!Number.isFinite(value)) return '0';
  const held = Math.min(Math.max(value, -COORDINATE_LIMIT), COORDINATE_LIMIT);
  return String(Math.round(held * 100) / 100);
}

/** Shorten text to `max` characters with an ellipsis (before escaping). */
export function truncate(text: string, max: number): string {
  const chars = [...text];
  return chars.length <= max ? text : `${chars.slice(0, max - 1).join('')}…`;
}

/** An element with attributes (values escaped) and optional already-safe inner markup. */
export function element(name: string, attributes: Record<string, string | number>, inner?: string): string {
  const attrs = Object.entries(attributes)
    .map(([key, value]) => ` ${key}="${typeof value === 'number' ? coord(value) : escapeXml(value)}"`)
    .join('');
  return inner === undefined ? `<${name}${attrs}/>` : `<${name}${attrs}>${inner}</${name}>`;
}
