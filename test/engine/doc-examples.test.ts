/**
 * Every `@example` in the engine's doc comments is run and its stated value
 * checked, so an example can never drift from the code. Each example reads
 *
 *   @example call(args) // VALUE — why (source: …)
 *
 * VALUE is JSON (a number, an array, a string, true/false), or a number
 * ending in "…" (the digits shown are the true value's leading digits), or
 * "≈ number" (the true value rounds to it). Each example names its source
 * beside the value ("source: …"), as every check value in the tests does.
 * The call runs with the exports of the module that holds the example.
 *
 * And every exported function of the engine's numeric modules (stats/, the
 * fit helpers, the Guideline 14 and savings numerics) has an example.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';

const ENGINE = join(import.meta.dirname, '..', '..', 'src', 'engine');

/** The modules whose every exported function carries an example. */
const NUMERIC_MODULES = [
  'stats/autocorrelation.ts',
  'stats/autocorrelation-inflation.ts',
  'stats/davies-bound.ts',
  'stats/distributions.ts',
  'stats/goodness-of-fit.ts',
  'stats/out-of-sample.ts',
  'stats/savings-uncertainty.ts',
  'fit/degree-days.ts',
  'fit/matrix.ts',
  'fit/wls.ts',
  'guideline14.ts',
  'rollup.ts',
];

interface DocExample {
  file: string;
  call: string;
  value: string;
  why: string;
}

function engineFiles(folder: string): string[] {
  return readdirSync(folder, { withFileTypes: true }).flatMap((entry) =>
    entry.isDirectory()
      ? engineFiles(join(folder, entry.name))
      : entry.name.endsWith('.ts')
        ? [join(folder, entry.name)]
        : [],
  );
}

/** The examples of one file: an @example line and its continuation lines up to the next tag or the comment's end. */
function examplesOf(path: string): DocExample[] {
  const file = relative(ENGINE, path);
  const examples: DocExample[] = [];
  for (const [, body] of readFileSync(path, 'utf8').matchAll(/\/\*\*([\s\S]*?)\*\//g)) {
    const lines = body!.split('\n').map((line) => line.replace(/^\s*\*\s?/, '').trim());
    lines.forEach((line, index) => {
      if (!line.startsWith('@example ')) return;
      let text = line.slice('@example '.length);
      for (let next = index + 1; next < lines.length && lines[next] !== '' && !lines[next]!.startsWith('@'); next++)
        text += ` ${lines[next]}`;
      const split = text.indexOf(' // ');
      const rest = split < 0 ? '' : text.slice(split + 4);
      const dash = rest.indexOf(' — ');
      examples.push({
        file,
        call: split < 0 ? text : text.slice(0, split),
        value: dash < 0 ? rest : rest.slice(0, dash),
        why: dash < 0 ? '' : rest.slice(dash + 3),
      });
    });
  }
  return examples;
}

function expectValue(actual: unknown, stated: string, where: string): void {
  const approx = stated.startsWith('≈ ');
  const truncated = stated.endsWith('…');
  if (approx || truncated) {
    const digits = stated.replace(/^≈ /, '').replace(/…$/, '');
    const decimals = digits.split('.')[1]?.length ?? 0;
    const shown = Number(digits);
    expect(typeof actual, where).toBe('number');
    const value = actual as number;
    if (approx) expect(Math.abs(value - shown), where).toBeLessThanOrEqual(0.5 * 10 ** -decimals * (1 + 1e-9));
    else expect(Math.trunc(value * 10 ** decimals) / 10 ** decimals, where).toBeCloseTo(shown, decimals + 2);
    return;
  }
  expectClose(actual, JSON.parse(stated) as unknown, where);
}

/** Equal, numbers to 12 significant digits (floating-point sums). */
function expectClose(actual: unknown, expected: unknown, where: string): void {
  if (typeof expected === 'number') {
    expect(typeof actual, where).toBe('number');
    expect(Math.abs((actual as number) - expected), where).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(expected)));
  } else if (Array.isArray(expected)) {
    expect(Array.isArray(actual), where).toBe(true);
    expect((actual as unknown[]).length, where).toBe(expected.length);
    expected.forEach((item, i) => expectClose((actual as unknown[])[i], item, `${where}[${i}]`));
  } else {
    expect(actual, where).toEqual(expected);
  }
}

const EXAMPLES = engineFiles(ENGINE).flatMap(examplesOf);

describe('the engine doc comments', () => {
  it('have examples, each with a value and a source', () => {
    expect(EXAMPLES.length).toBeGreaterThan(25);
    for (const example of EXAMPLES) {
      const where = `${example.file}: @example ${example.call}`;
      expect(example.value, where).not.toBe('');
      expect(example.why, where).toMatch(/\(source: [^)]+\)/);
    }
  });

  it.each(EXAMPLES.map((e) => [`${e.file}: ${e.call}`, e] as const))('%s', async (_name, example) => {
    const module = (await import(pathToFileURL(join(ENGINE, example.file)).href)) as Record<string, unknown>;
    const names = Object.keys(module);
    const run = new Function(...names, `return (${example.call});`) as (...args: unknown[]) => unknown;
    expectValue(
      run(...names.map((name) => module[name])),
      example.value,
      `${example.file}: ${example.call} // ${example.value}`,
    );
  });

  it('give every exported function of the numeric modules an example', () => {
    for (const file of NUMERIC_MODULES) {
      const exported = [...readFileSync(join(ENGINE, file), 'utf8').matchAll(/^export function (\w+)/gm)].map(
        (m) => m[1]!,
      );
      const shown = new Set(EXAMPLES.filter((e) => e.file === file).map((e) => /^(\w+)/.exec(e.call)?.[1]));
      for (const name of exported) expect(shown.has(name), `${file}: ${name} has no @example`).toBe(true);
    }
  });
});
