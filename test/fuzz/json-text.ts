/**
 * A JSON model that can say what JSON.stringify cannot: bare NaN and
 * Infinity tokens, -0, duplicated keys, __proto__ as an own key, and any
 * other raw text spliced in where a value belongs.
 */

/** Text put into the JSON as it is (a bare token, a deep nest, broken syntax). */
export class RawJson {
  constructor(readonly text: string) {}
}

/** An object as ordered entries, so keys may repeat and __proto__ is just a key. */
export class JsonEntries {
  constructor(readonly entries: readonly (readonly [string, JsonValue])[]) {}
}

export type JsonValue = null | boolean | number | string | RawJson | JsonEntries | readonly JsonValue[];

export function jsonText(value: JsonValue): string {
  if (value instanceof RawJson) return value.text;
  if (value instanceof JsonEntries)
    return `{${value.entries.map(([k, v]) => `${JSON.stringify(k)}:${jsonText(v)}`).join(',')}}`;
  if (Array.isArray(value)) return `[${value.map(jsonText).join(',')}]`;
  if (typeof value === 'number' && Object.is(value, -0)) return '-0';
  return JSON.stringify(value) ?? 'null';
}

/** The entries of an object value, or null when it is not one. */
export const entriesOf = (value: JsonValue): readonly (readonly [string, JsonValue])[] | null =>
  value instanceof JsonEntries ? value.entries : null;
