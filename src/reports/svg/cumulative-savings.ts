/**
 * Cumulative measured savings across a contract year: a line from zero at
 * the year's start through each period end, the guaranteed figure as a
 * dashed horizontal reference, and the ± uncertainty of the latest total as
 * a shaded band at the last point. The x-axis always spans the whole year,
 * so a year not yet complete shows how much of it is still to come.
 */
import { coord, element, escapeXml, truncate } from './xml.js';
import { axisFraction, axisScale, finiteExtent, tickLabel } from './ticks.js';
import {
  chartOpen,
  legendRow,
  plotNote,
  PALETTE,
  valueAxis,
  valueGrid,
  type LegendItem,
  type PlotBox,
} from './chart-frame.js';
import { dateTicks, dayOf, type DateTick } from './date-axis.js';

export interface CumulativeSavingsData {
  title: string;
  unit: string;
  yearStart: string;
  /** Exclusive. */
  yearEnd: string;
  guaranteed: number | null;
  /** ± of the last point, same unit; null when unknown. */
  uncertainty: number | null;
  /** Cumulative savings at each period end. */
  points: { end: string; value: number }[];
}

const WIDTH = 760;
const HEIGHT = 420;
const BOX: PlotBox = { left: 88, right: WIDTH - 28, top: 78, bottom: HEIGHT - 96 };
const MARK_RADIUS = 3.8;
const BAND_HALF_WIDTH = 8;

/** The chart as SVG text; a pure function of its data. */
export function renderCumulativeSavingsSvg(data: CumulativeSavingsData): string {
  const points = data.points
    .map((p) => ({ day: dayOf(p.end), value: p.value }))
    .filter((p): p is { day: number; value: number } => p.day !== null && Number.isFinite(p.value))
    .sort((a, b) => a.day - b.day);
  const span = xSpan(data, points);
  const last = points[points.length - 1] ?? null;
  const guaranteed = data.guaranteed !== null && Number.isFinite(data.guaranteed) ? data.guaranteed : null;
  const uncertainty =
    last !== null && data.uncertainty !== null && Number.isFinite(data.uncertainty) ? Math.abs(data.uncertainty) : null;

  const values = [0, ...points.map((p) => p.value)];
  if (guaranteed !== null) values.push(guaranteed);
  // A band reaching past the largest double is drawn to the axis's end.
  if (last !== null && uncertainty !== null)
    values.push(held(last.value - uncertainty), held(last.value + uncertainty));
  // With nothing but zeros to show, a 0..1 axis reads better than one centred on zero.
  // Headroom above the highest value keeps the guarantee's label inside the plot.
  const { min: low, max: high } = finiteExtent(values) ?? { min: 0, max: 0 };
  const y = axisScale(low, high > low ? held(high + 0.06 * (high / 2 - low / 2) * 2) : low + 1);
  const px = (day: number) => BOX.left + ((day - span.start) / (span.end - span.start)) * (BOX.right - BOX.left);
  const py = (v: number) => BOX.bottom - axisFraction(y, v) * (BOX.bottom - BOX.top);

  const title = truncate(data.title, 70);
  const latest =
    last === null
      ? 'no periods counted yet'
      : `${amount(last.value)} ${data.unit}${uncertainty === null ? '' : ` ± ${amount(uncertainty)}`} to date`;
  const subtitle = `${data.yearStart} to ${data.yearEnd} (end exclusive): ${latest}`;
  const description =
    `Cumulative measured savings in ${data.unit} at ${points.length} period ends across the year` +
    (guaranteed === null ? '; no guaranteed figure.' : `, against a guaranteed ${amount(guaranteed)} ${data.unit}.`);

  const ticks = dateTicks(span.start, span.end);
  const parts = [
    chartOpen({ width: WIDTH, height: HEIGHT, chart: 'cumulative-savings', title, subtitle, description }),
    valueGrid(y, BOX, py),
    dateGrid(ticks, px),
    valueAxis(y, BOX, py, `Cumulative savings (${data.unit})`),
    dateAxis(ticks, px),
    y.min < 0
      ? element('line', {
          class: 'zero-line',
          x1: BOX.left,
          y1: py(0),
          x2: BOX.right,
          y2: py(0),
          stroke: PALETTE.frame,
          'stroke-width': 1,
        })
      : '',
    guaranteeLine(guaranteed, data.unit, py),
    last !== null && uncertainty !== null ? band(last, uncertainty, data.unit, px, py) : '',
    curve(points, span.start, px, py, data.unit),
    points.length === 0 ? plotNote(BOX, 'No reporting periods counted yet') : '',
    legend(guaranteed !== null, uncertainty !== null),
    '</svg>',
  ];
  return `${parts.filter((p) => p !== '').join('\n')}\n`;
}

/** A sum held to the finite range (±Number.MAX_VALUE). */
function held(value: number): number {
  if (Number.isNaN(value)) return 0;
  return Math.min(Math.max(value, -Number.MAX_VALUE), Number.MAX_VALUE);
}

/** A value as a short grouped label, with decimals to suit its size. */
function amount(value: number): string {
  return tickLabel(Number(value.toFixed(decimals(value))), decimals(value));
}

function decimals(value: number): number {
  const magnitude = Math.abs(value);
  return magnitude >= 1000 ? 0 : magnitude >= 10 ? 1 : 2;
}

/** The year's days; falls back to the points' own span when the year's dates are unusable. */
function xSpan(data: CumulativeSavingsData, points: readonly { day: number }[]): { start: number; end: number } {
  const start = dayOf(data.yearStart);
  const end = dayOf(data.yearEnd);
  const days = finiteExtent(points.map((p) => p.day));
  if (start !== null && end !== null && end > start) {
    return { start: Math.min(start, days?.min ?? start), end: Math.max(end, days?.max ?? end) };
  }
  const low = days?.min ?? 0;
  const high = days?.max ?? 1;
  return high > low ? { start: low, end: high } : { start: low - 1, end: low + 1 };
}

function dateGrid(ticks: readonly DateTick[], px: (day: number) => number): string {
  const lines = ticks.map((t) => element('line', { x1: px(t.day), y1: BOX.top, x2: px(t.day), y2: BOX.bottom }));
  return `<g class="grid" stroke="${PALETTE.grid}" stroke-width="1">${lines.join('')}</g>`;
}

function dateAxis(ticks: readonly DateTick[], px: (day: number) => number): string {
  const marks = ticks.map(
    (t) =>
      element('line', { x1: px(t.day), y1: BOX.bottom, x2: px(t.day), y2: BOX.bottom + 5 }) +
      element(
        'text',
        { x: px(t.day), y: BOX.bottom + 20, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.label },
        escapeXml(t.label),
      ),
  );
  const title = element(
    'text',
    {
      class: 'axis-title',
      x: (BOX.left + BOX.right) / 2,
      y: BOX.bottom + 46,
      'text-anchor': 'middle',
      stroke: 'none',
      fill: PALETTE.ink,
      'font-size': 13,
    },
    escapeXml('Period end date'),
  );
  return `<g class="date-axis" stroke="${PALETTE.frame}" stroke-width="1.2" font-size="12">${marks.join('')}${title}</g>`;
}

function guaranteeLine(guaranteed: number | null, unit: string, py: (v: number) => number): string {
  if (guaranteed === null) return '';
  const y = py(guaranteed);
  const label = `Guaranteed ${amount(guaranteed)} ${unit}`;
  return [
    element('line', {
      class: 'guarantee-line',
      x1: BOX.left,
      y1: y,
      x2: BOX.right,
      y2: y,
      stroke: PALETTE.reportingDark,
      'stroke-width': 1.8,
      'stroke-dasharray': '7 5',
    }),
    element(
      'text',
      { x: BOX.left + 8, y: y - 7, fill: PALETTE.reportingDark, 'font-size': 12, 'font-weight': '600' },
      escapeXml(label),
    ),
  ].join('');
}

function band(
  last: { day: number; value: number },
  uncertainty: number,
  unit: string,
  px: (day: number) => number,
  py: (v: number) => number,
): string {
  const x = px(last.day);
  const top = py(held(last.value + uncertainty));
  const bottom = py(held(last.value - uncertainty));
  const tip = `± ${amount(uncertainty)} ${unit} around the latest cumulative total`;
  return [
    element(
      'rect',
      {
        class: 'uncertainty-band',
        x: x - BAND_HALF_WIDTH,
        y: top,
        width: BAND_HALF_WIDTH * 2,
        height: Math.max(0, bottom - top),
        fill: PALETTE.baselineFill,
        'fill-opacity': 0.22,
        stroke: PALETTE.baselineStroke,
        'stroke-width': 1,
      },
      element('title', {}, escapeXml(tip)),
    ),
    element('path', {
      d: `M${coord(x - BAND_HALF_WIDTH)} ${coord(top)}H${coord(x + BAND_HALF_WIDTH)}M${coord(x)} ${coord(top)}V${coord(bottom)}M${coord(x - BAND_HALF_WIDTH)} ${coord(bottom)}H${coord(x + BAND_HALF_WIDTH)}`,
      fill: 'none',
      stroke: PALETTE.baselineStroke,
      'stroke-width': 1.2,
    }),
  ].join('');
}

function curve(
  points: readonly { day: number; value: number }[],
  startDay: number,
  px: (day: number) => number,
  py: (v: number) => number,
  unit: string,
): string {
  if (points.length === 0) return '';
  const vertices = [{ day: startDay, value: 0 }, ...points]
    .map((p) => `${coord(px(p.day))},${coord(py(p.value))}`)
    .join(' ');
  const line = element('polyline', {
    class: 'cumulative-line',
    points: vertices,
    fill: 'none',
    stroke: PALETTE.line,
    'stroke-width': 2.4,
    'stroke-linejoin': 'round',
  });
  const marks = points.map((p) =>
    element(
      'circle',
      { class: 'mark-cumulative', cx: px(p.day), cy: py(p.value), r: MARK_RADIUS },
      element('title', {}, escapeXml(`${amount(p.value)} ${unit}`)),
    ),
  );
  return `${line}<g fill="${PALETTE.baselineFill}" stroke="${PALETTE.baselineStroke}" stroke-width="1">${marks.join('')}</g>`;
}

function legend(withGuarantee: boolean, withBand: boolean): string {
  const items: LegendItem[] = [
    {
      label: 'Cumulative measured savings',
      swatch: (x, y) =>
        element('line', { x1: x, y1: y, x2: x + 16, y2: y, stroke: PALETTE.line, 'stroke-width': 2.4 }) +
        element('circle', {
          cx: x + 8,
          cy: y,
          r: MARK_RADIUS,
          fill: PALETTE.baselineFill,
          stroke: PALETTE.baselineStroke,
        }),
    },
  ];
  if (withGuarantee)
    items.push({
      label: 'Guaranteed',
      swatch: (x, y) =>
        element('line', {
          x1: x,
          y1: y,
          x2: x + 16,
          y2: y,
          stroke: PALETTE.reportingDark,
          'stroke-width': 1.8,
          'stroke-dasharray': '5 3',
        }),
    });
  if (withBand)
    items.push({
      label: '± uncertainty of the latest total',
      swatch: (x, y) =>
        element('rect', {
          x: x + 3,
          y: y - 8,
          width: 10,
          height: 16,
          fill: PALETTE.baselineFill,
          'fill-opacity': 0.22,
          stroke: PALETTE.baselineStroke,
        }),
    });
  return legendRow(items, BOX.left, HEIGHT - 22);
}
