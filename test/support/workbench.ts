/**
 * Helpers for the workbench's browser tests and benchmark: build the page's
 * script (web/build.mjs → dist/web, what the service serves at /app), sign
 * in, and run axe-core in the page.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import type { Page } from 'playwright-core';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));

/** Build the workbench's script so the service serves the current source. */
export function buildWorkbench(): void {
  execFileSync(process.execPath, [`${ROOT}web/build.mjs`], { stdio: 'inherit' });
}

/** Open /app, paste the key and wait for the screens. */
export async function signIn(page: Page, base: string, key: string): Promise<void> {
  await page.goto(`${base}/app/`);
  await page.getByLabel('API key').fill(key);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.locator('header.masthead').waitFor();
}

let axeSource: string | null = null;
/** axe-core's browser bundle, read when first needed (so a run that skips the browser tests never needs the package). */
function axe(): string {
  axeSource ??= readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
  return axeSource;
}

export interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  targets: string[];
}

/**
 * axe-core's WCAG 2.x A and AA rules on the page as it stands. The checker is
 * evaluated through the DevTools protocol (not a script tag), so the page's
 * own content security policy stays in force and is tested with it.
 */
export async function accessibilityViolations(page: Page): Promise<AxeViolation[]> {
  await page.evaluate(axe());
  return page.evaluate(async () => {
    const axe = (
      globalThis as unknown as {
        axe: {
          run: (
            context: unknown,
            options: unknown,
          ) => Promise<{
            violations: { id: string; impact: string | null; help: string; nodes: { target: string[] }[] }[];
          }>;
        };
      }
    ).axe;
    const result = await axe.run((globalThis as unknown as { document: unknown }).document, {
      runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] },
    });
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      targets: v.nodes.map((n) => n.target.join(' ')),
    }));
  });
}

/** Violations axe calls serious or critical. */
export async function seriousViolations(page: Page): Promise<AxeViolation[]> {
  return (await accessibilityViolations(page)).filter((v) => v.impact === 'serious' || v.impact === 'critical');
}
