/**
 * Cell text to values. Numbers are plain decimals (an optional sign and
 * exponent); thousands separators and units are refused rather than guessed.
 */

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export type CellValue<T> = { ok: true; value: T } | { ok: false; message: string };

export function parseNumberCell(text: string): CellValue<number> {
  if (text === '') return { ok: false, message: 'empty: a number is needed' };
  if (!DECIMAL.test(text)) {
    const hint = /^[+-]?\d{1,3}(,\d{3})+(\.\d*)?$/.test(text) ? ' (write numbers without thousands separators)' : '';
    return { ok: false, message: `not a number: ${JSON.stringify(text)}${hint}` };
  }
  return { ok: true, value: Number(text) };
}

const TRUE_WORDS = new Set(['true', 'yes', '1']);
const FALSE_WORDS = new Set(['false', 'no', '0', '']);

/** true/false/yes/no/1/0, any case; an empty cell means false. */
export function parseFlagCell(text: string): CellValue<boolean> {
  const word = text.toLowerCase();
  if (TRUE_WORDS.has(word)) return { ok: true, value: true };
  if (FALSE_WORDS.has(word)) return { ok: true, value: false };
  return { ok: false, message: `not true/false/yes/no/1/0: ${JSON.stringify(text)}` };
}
