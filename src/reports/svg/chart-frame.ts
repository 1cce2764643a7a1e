/**
 * The pieces every report chart shares with the energy signature: the same
 * palette family (slate frame, teal baseline, deep blue-green line, amber
 * reporting data), the heading, a value axis with grid lines, and a one-row
 * legend. Plain strings in, SVG text out; all user text is escaped here.
 */
import { coord, element, escapeXml } from './xml.js';
import { tickLabel, type AxisScale } from './ticks.js';

/** The signature chart's colours, with a pale teal for baseline bars, a darker amber for edges and grey for extrapolated periods. */
export const PALETTE = {
  paper: '#fbfaf6',
  ink: '#0f172a',
  frame: '#475569',
  label: '#334155',
  grid: '#e2e8f0',
  baselineFill: '#14b8a6',
  baselinePale: '#ccfbf1',
  baselineStroke: '#0f766e',
  line: '#0f4c5c',
  reporting: '#d97706',
  reportingDark: '#b45309',
  outside: '#eef2f6',
} as const;

/** System fonts only: the charts must render with nothing fetched. */
export const FONT = 'system-ui, -apple-system, Segoe UI, Helvetica, Arial, sans-serif';

/** The plot area inside the chart, in SVG pixels. */
export interface PlotBox {
  left: number;
  right: number;
  top: number;
  bottom: number;
}

/** The root element, background, title and description (both escaped), and the visible heading. */
export function chartOpen(options: {
  width: number;
  height: number;
  chart: string;
  title: string;
  subtitle: string;
  description: string;
}): string {
  const { width, height } = options;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" data-chart="${escapeXml(options.chart)}" font-family="${escapeXml(FONT)}">`,
    element('title', {}, escapeXml(options.title)),
    element('desc', {}, escapeXml(options.description)),
    element('rect', { x: 0, y: 0, width, height, fill: PALETTE.paper }),
    element(
      'text',
      { x: 24, y: 32, 'font-size': 18, 'font-weight': '600', fill: PALETTE.ink },
      escapeXml(options.title),
    ),
    element('text', { x: 24, y: 54, 'font-size': 12.5, fill: PALETTE.frame }, escapeXml(options.subtitle)),
  ].join('\n');
}

/** Horizontal grid lines at the value ticks. */
export function valueGrid(scale: AxisScale, box: PlotBox, py: (v: number) => number): string {
  const lines = scale.ticks.map((t) => element('line', { x1: box.left, y1: py(t), x2: box.right, y2: py(t) }));
  return `<g class="grid" stroke="${PALETTE.grid}" stroke-width="1">${lines.join('')}</g>`;
}

/** The left value axis with its ticks, labels and rotated title, and the frame's bottom edge. */
export function valueAxis(scale: AxisScale, box: PlotBox, py: (v: number) => number, title: string): string {
  const tickLength = 5;
  const ticks = scale.ticks.map(
    (t) =>
      element('line', { x1: box.left - tickLength, y1: py(t), x2: box.left, y2: py(t) }) +
      element(
        'text',
        { x: box.left - 9, y: py(t), dy: '0.32em', 'text-anchor': 'end', stroke: 'none', fill: PALETTE.label },
        escapeXml(tickLabel(t, scale.decimals)),
      ),
  );
  const middleY = (box.top + box.bottom) / 2;
  return [
    `<g class="axes" stroke="${PALETTE.frame}" stroke-width="1.2" font-size="12">`,
    element('path', {
      d: `M${coord(box.left)} ${coord(box.top)}V${coord(box.bottom)}H${coord(box.right)}`,
      fill: 'none',
    }),
    ...ticks,
    element(
      'text',
      {
        class: 'axis-title',
        x: 24,
        y: middleY,
        transform: `rotate(-90 24 ${coord(middleY)})`,
        'text-anchor': 'middle',
        stroke: 'none',
        fill: PALETTE.ink,
        'font-size': 13,
      },
      escapeXml(title),
    ),
    '</g>',
  ].join('');
}

/** A legend entry: a swatch (already-safe markup drawn around x, y) and its label. */
export interface LegendItem {
  swatch: (x: number, y: number) => string;
  label: string;
}

/** One row of legend entries starting at x; text widths are estimated (about 0.56 em per character). */
export function legendRow(items: readonly LegendItem[], x: number, y: number): string {
  const fontSize = 12;
  let cursor = x;
  const parts: string[] = [];
  for (const item of items) {
    parts.push(item.swatch(cursor, y));
    parts.push(
      element(
        'text',
        { x: cursor + 22, y, dy: '0.32em', fill: PALETTE.label, 'font-size': fontSize },
        escapeXml(item.label),
      ),
    );
    cursor += 22 + [...item.label].length * fontSize * 0.56 + 26;
  }
  return `<g class="legend">${parts.join('')}</g>`;
}

/** A centred note inside the plot area (e.g. "No reporting periods"). */
export function plotNote(box: PlotBox, text: string): string {
  return element(
    'text',
    {
      class: 'plot-note',
      x: (box.left + box.right) / 2,
      y: (box.top + box.bottom) / 2,
      'text-anchor': 'middle',
      fill: PALETTE.frame,
      'font-size': 14,
    },
    escapeXml(text),
  );
}
