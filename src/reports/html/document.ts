/**
 * The HTML5 shell: one self-contained document with the inline style sheet,
 * no scripts and no external resources. The content security policy says as
 * much to the browser, so even a mistake in escaping could not load or run
 * anything.
 */
import { REPORT_CSS } from './styles.js';
import { text } from './markup.js';

const POLICY = "default-src 'none'; style-src 'unsafe-inline'; img-src data:";

/** Wrap the body markup in a complete document with the given (escaped) title; `extraCss` follows the report's style sheet. */
export function htmlDocument(title: string, body: string, extraCss = ''): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${POLICY}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${text(title)}</title>`,
    `<style>${REPORT_CSS}${extraCss}</style>`,
    '</head>',
    '<body>',
    body,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
