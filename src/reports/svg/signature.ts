/**
 * The energy signature as an SVG chart: use per day against mean outdoor
 * temperature, one mark per baseline period, the fitted baseline model as a
 * line over the baseline's temperature range, and the reporting periods in
 * a second, hollow mark. A pure function of plain data: no database, no
 * engine call; the caller hands in points the engine has already computed
 * (signature-points.ts).
 *
 * A day-resolved model's line is its daily response, drawn over the daily
 * temperatures it saw; each bill keeps its mark at its mean temperature and
 * gets a short tick at its own expected use (the response averaged over its
 * days), with a note saying why bills near a changepoint sit above the line.
 */
import { coord, element, escapeXml, truncate } from './xml.js';
import { axisFraction, axisScale, finiteExtent, tickLabel, type AxisScale } from './ticks.js';
import { FONT, PALETTE } from './chart-frame.js';

export interface SignaturePoint {
  /** Mean outdoor temperature of the period, in the station's unit. */
  temp: number;
  /** Use per day, in the meter's unit. */
  usePerDay: number;
  /** Shown as the mark's tooltip (e.g. the period's dates). */
  label?: string;
}

export interface SignatureChartData {
  meterName: string;
  /** The baseline's chosen shape, e.g. 3PH. */
  model: string;
  version: number;
  status: string;
  baselineStart: string;
  baselineEnd: string;
  temperatureUnit: 'F' | 'C';
  /** The meter's unit of quantity, e.g. kWh. */
  useUnit: string;
  baseline: readonly SignaturePoint[];
  /** Vertices of the fitted model, in temperature order. */
  fittedLine: readonly SignaturePoint[];
  reporting: readonly SignaturePoint[];
  /** The model's form; 'daily' draws the daily response with each bill's expected use. Default 'mean'. */
  temperatureForm?: 'daily' | 'mean';
  /** Day-resolved models: each bill's expected use per day at its mean temperature. */
  expected?: readonly SignaturePoint[];
  /** The reporting points are actual use net of non-routine adjustments (the legend and a note say so). Default false. */
  reportingNetOfAdjustments?: boolean;
}

/** The chart's note when reporting periods are drawn net of their non-routine adjustments. */
export const NET_OF_ADJUSTMENTS_NOTE =
  'Reporting periods are drawn net of their non-routine adjustments (actual − adjustment), so each sits against the line as its avoided energy does.';

function reportingLabel(data: SignatureChartData): string {
  return data.reportingNetOfAdjustments
    ? `Reporting periods, net of adjustments (${data.reporting.length})`
    : `Reporting periods (${data.reporting.length})`;
}

/** The chart's note on a day-resolved model: why a bill's expected use sits above the line. */
export const DAY_RESOLVED_NOTE =
  'Near a changepoint a bill’s expected use (tick) sits above the line: it averages days on both sides, and the response is convex.';

const WIDTH = 760;
const HEIGHT = 520;
const PLOT = { left: 88, right: WIDTH - 28, top: 78, bottom: HEIGHT - 100 } as const;
const MARK_RADIUS = 4.2;
const DIAMOND = 5.6;
const TICK_HALF = 7;

export function renderSignatureSvg(data: SignatureChartData): string {
  const daily = data.temperatureForm === 'daily';
  const expected = daily ? (data.expected ?? []) : [];
  const all = [...data.baseline, ...data.fittedLine, ...data.reporting, ...expected];
  const temps = finiteExtent(all.map((p) => p.temp));
  const uses = finiteExtent(all.map((p) => p.usePerDay));
  const x = axisScale(temps?.min ?? Number.NaN, temps?.max ?? Number.NaN);
  // Use per day starts at zero so the base load reads in proportion.
  const y = axisScale(Math.min(0, uses?.min ?? 0), uses?.max ?? Number.NaN);
  const px = (t: number) => PLOT.left + axisFraction(x, t) * (PLOT.right - PLOT.left);
  const py = (u: number) => PLOT.bottom - axisFraction(y, u) * (PLOT.bottom - PLOT.top);

  const degree = data.temperatureUnit === 'F' ? '°F' : '°C';
  const title = `${truncate(data.meterName, 60)}: energy signature`;
  const subtitle = daily
    ? `Baseline version ${data.version} (${data.status}), ${data.model} model, day-resolved, ${data.baselineStart} to ${data.baselineEnd} (end exclusive)`
    : `Baseline version ${data.version} (${data.status}), ${data.model} model, ${data.baselineStart} to ${data.baselineEnd} (end exclusive)`;
  const description = daily
    ? `${data.baseline.length} baseline periods, ${data.reporting.length} reporting periods, the ${data.model} model's daily response over the daily temperatures it saw, and ${expected.length} bills' expected use (the response averaged over each bill's days); use per day in ${data.useUnit}/day against mean outdoor temperature in ${degree}.`
    : `${data.baseline.length} baseline periods, ${data.reporting.length} reporting periods, fitted ${data.model} line; use per day in ${data.useUnit}/day against mean outdoor temperature in ${degree}.`;
  const netNote = data.reportingNetOfAdjustments ? ` ${NET_OF_ADJUSTMENTS_NOTE}` : '';

  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${WIDTH}" height="${HEIGHT}" viewBox="0 0 ${WIDTH} ${HEIGHT}" role="img" font-family="${escapeXml(FONT)}">`,
    element('title', {}, escapeXml(title)),
    element('desc', {}, escapeXml(description + netNote)),
    element('rect', { x: 0, y: 0, width: WIDTH, height: HEIGHT, fill: PALETTE.paper }),
    element('text', { x: 24, y: 32, 'font-size': 18, 'font-weight': '600', fill: PALETTE.ink }, escapeXml(title)),
    element('text', { x: 24, y: 54, 'font-size': 12.5, fill: PALETTE.frame }, escapeXml(subtitle)),
    grid(x, y, px, py),
    axes(x, y, px, py, `Mean outdoor temperature (${degree})`, `Use per day (${data.useUnit}/day)`),
    fittedLine(data.fittedLine, px, py),
    baselineMarks(data.baseline, px, py),
    reportingMarks(data.reporting, px, py),
    expectedMarks(expected, px, py),
    daily ? dailyLegend(data, expected.length) : legend(data),
    chartNote(daily && expected.length > 0, data.reportingNetOfAdjustments === true && data.reporting.length > 0),
    '</svg>',
  ];
  return `${parts.join('\n')}\n`;
}

type Project = (value: number) => number;

/** The note under the legend: the day-resolved tick's meaning and/or that reporting marks are net of adjustments. */
function chartNote(dayResolved: boolean, netOfAdjustments: boolean): string {
  const texts = [dayResolved ? DAY_RESOLVED_NOTE : '', netOfAdjustments ? NET_OF_ADJUSTMENTS_NOTE : ''].filter(
    (t) => t !== '',
  );
  // One line each, the last at the foot of the chart.
  return texts.map((t, i) => note(t, HEIGHT - 6 - 13 * (texts.length - 1 - i))).join('');
}

function grid(x: AxisScale, y: AxisScale, px: Project, py: Project): string {
  const lines = [
    ...x.ticks.map((t) => element('line', { x1: px(t), y1: PLOT.top, x2: px(t), y2: PLOT.bottom })),
    ...y.ticks.map((t) => element('line', { x1: PLOT.left, y1: py(t), x2: PLOT.right, y2: py(t) })),
  ];
  return `<g class="grid" stroke="${PALETTE.grid}" stroke-width="1">${lines.join('')}</g>`;
}

function axes(x: AxisScale, y: AxisScale, px: Project, py: Project, xTitle: string, yTitle: string): string {
  const tickLength = 5;
  const xTicks = x.ticks.map(
    (t) =>
      element('line', { x1: px(t), y1: PLOT.bottom, x2: px(t), y2: PLOT.bottom + tickLength }) +
      element(
        'text',
        { x: px(t), y: PLOT.bottom + 20, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.label },
        escapeXml(tickLabel(t, x.decimals)),
      ),
  );
  const yTicks = y.ticks.map(
    (t) =>
      element('line', { x1: PLOT.left - tickLength, y1: py(t), x2: PLOT.left, y2: py(t) }) +
      element(
        'text',
        { x: PLOT.left - 9, y: py(t), dy: '0.32em', 'text-anchor': 'end', stroke: 'none', fill: PALETTE.label },
        escapeXml(tickLabel(t, y.decimals)),
      ),
  );
  const middleX = (PLOT.left + PLOT.right) / 2;
  const middleY = (PLOT.top + PLOT.bottom) / 2;
  return [
    `<g class="axes" stroke="${PALETTE.frame}" stroke-width="1.2" font-size="12">`,
    element('path', {
      d: `M${coord(PLOT.left)} ${coord(PLOT.top)}V${coord(PLOT.bottom)}H${coord(PLOT.right)}`,
      fill: 'none',
    }),
    ...xTicks,
    ...yTicks,
    element(
      'text',
      {
        class: 'axis-title',
        x: middleX,
        y: PLOT.bottom + 46,
        'text-anchor': 'middle',
        stroke: 'none',
        fill: PALETTE.ink,
        'font-size': 13,
      },
      escapeXml(xTitle),
    ),
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
      escapeXml(yTitle),
    ),
    '</g>',
  ].join('');
}

/** Only points with both coordinates finite are drawn (a chart never invents a position). */
function drawable(points: readonly SignaturePoint[]): SignaturePoint[] {
  return points.filter((p) => Number.isFinite(p.temp) && Number.isFinite(p.usePerDay));
}

function fittedLine(all: readonly SignaturePoint[], px: Project, py: Project): string {
  const points = drawable(all);
  if (points.length < 2) return '';
  const coordinates = points.map((p) => `${coord(px(p.temp))},${coord(py(p.usePerDay))}`).join(' ');
  return element('polyline', {
    class: 'fit-line',
    points: coordinates,
    fill: 'none',
    stroke: PALETTE.line,
    'stroke-width': 2.4,
    'stroke-linejoin': 'round',
  });
}

function tooltip(point: SignaturePoint): string | undefined {
  return point.label === undefined ? undefined : element('title', {}, escapeXml(point.label));
}

function baselineMarks(points: readonly SignaturePoint[], px: Project, py: Project): string {
  const marks = drawable(points).map((p) =>
    element('circle', { class: 'mark-baseline', cx: px(p.temp), cy: py(p.usePerDay), r: MARK_RADIUS }, tooltip(p)),
  );
  return `<g fill="${PALETTE.baselineFill}" fill-opacity="0.85" stroke="${PALETTE.baselineStroke}" stroke-width="1">${marks.join('')}</g>`;
}

function diamondPath(cx: number, cy: number, size: number): string {
  return `M${coord(cx)} ${coord(cy - size)}L${coord(cx + size)} ${coord(cy)}L${coord(cx)} ${coord(cy + size)}L${coord(cx - size)} ${coord(cy)}Z`;
}

function reportingMarks(points: readonly SignaturePoint[], px: Project, py: Project): string {
  if (points.length === 0) return '';
  const marks = drawable(points).map((p) =>
    element('path', { class: 'mark-reporting', d: diamondPath(px(p.temp), py(p.usePerDay), DIAMOND) }, tooltip(p)),
  );
  return `<g fill="${PALETTE.paper}" fill-opacity="0.6" stroke="${PALETTE.reporting}" stroke-width="1.8">${marks.join('')}</g>`;
}

/** Each bill's expected use: a short horizontal tick in ink, centred on the bill's mean temperature. */
function expectedMarks(points: readonly SignaturePoint[], px: Project, py: Project): string {
  if (points.length === 0) return '';
  const marks = points.map((p) => {
    const x = px(p.temp);
    const y = py(p.usePerDay);
    return element(
      'path',
      { class: 'mark-expected', d: `M${coord(x - TICK_HALF)} ${coord(y)}H${coord(x + TICK_HALF)}` },
      tooltip(p),
    );
  });
  return `<g fill="none" stroke="${PALETTE.ink}" stroke-width="2.2" stroke-linecap="round">${marks.join('')}</g>`;
}

/** The note on a day-resolved chart, on the bottom line, its size fitted to the width (about 0.52 em per character of running text). */
function note(text: string, y: number = HEIGHT - 6): string {
  const fontSize = Math.min(11, (WIDTH - 48) / (text.length * 0.52));
  return element(
    'text',
    { class: 'chart-note', x: 24, y, fill: PALETTE.frame, 'font-size': Number(fontSize.toFixed(2)) },
    escapeXml(text),
  );
}

/** The day-resolved chart's legend: four items from the left edge, a little smaller. */
function dailyLegend(data: SignatureChartData, expected: number): string {
  const fontSize = 11;
  const rowY = HEIGHT - 30;
  let cursor = 24;
  const items: string[] = [];
  const label = (text: string) => {
    items.push(
      element(
        'text',
        { x: cursor + 22, y: rowY, dy: '0.32em', fill: PALETTE.label, 'font-size': fontSize },
        escapeXml(text),
      ),
    );
    cursor += 22 + text.length * fontSize * 0.56 + 22;
  };
  items.push(
    element('circle', {
      cx: cursor + 8,
      cy: rowY,
      r: MARK_RADIUS,
      fill: PALETTE.baselineFill,
      stroke: PALETTE.baselineStroke,
    }),
  );
  label(`Baseline periods (${data.baseline.length})`);
  items.push(
    element('line', { x1: cursor, y1: rowY, x2: cursor + 16, y2: rowY, stroke: PALETTE.line, 'stroke-width': 2.4 }),
  );
  label(`${data.model} daily response`);
  if (data.reporting.length > 0) {
    items.push(
      element('path', {
        d: diamondPath(cursor + 8, rowY, DIAMOND),
        fill: PALETTE.paper,
        stroke: PALETTE.reporting,
        'stroke-width': 1.8,
      }),
    );
    label(reportingLabel(data));
  }
  if (expected > 0) {
    items.push(
      element('path', {
        d: `M${coord(cursor + 8 - TICK_HALF)} ${coord(rowY)}H${coord(cursor + 8 + TICK_HALF)}`,
        stroke: PALETTE.ink,
        'stroke-width': 2.2,
        'stroke-linecap': 'round',
      }),
    );
    label(`Expected use of each bill (${expected})`);
  }
  return `<g class="legend">${items.join('')}</g>`;
}

/** A one-row legend under the x-axis title; text widths are estimated (about 0.56 em per character). */
function legend(data: SignatureChartData): string {
  const baseline = `Baseline periods (${data.baseline.length})`;
  const line = `Fitted ${data.model} model`;
  const reporting = reportingLabel(data);
  const fontSize = 12;
  const rowY = HEIGHT - 26;
  let cursor = PLOT.left;
  const items: string[] = [];
  const label = (text: string) => {
    items.push(
      element(
        'text',
        { x: cursor + 22, y: rowY, dy: '0.32em', fill: PALETTE.label, 'font-size': fontSize },
        escapeXml(text),
      ),
    );
    cursor += 22 + text.length * fontSize * 0.56 + 26;
  };
  items.push(
    element('circle', {
      cx: cursor + 8,
      cy: rowY,
      r: MARK_RADIUS,
      fill: PALETTE.baselineFill,
      stroke: PALETTE.baselineStroke,
    }),
  );
  label(baseline);
  items.push(
    element('line', { x1: cursor, y1: rowY, x2: cursor + 16, y2: rowY, stroke: PALETTE.line, 'stroke-width': 2.4 }),
  );
  label(line);
  if (data.reporting.length > 0) {
    items.push(
      element('path', {
        d: diamondPath(cursor + 8, rowY, DIAMOND),
        fill: PALETTE.paper,
        stroke: PALETTE.reporting,
        'stroke-width': 1.8,
      }),
    );
    label(reporting);
  }
  return `<g class="legend">${items.join('')}</g>`;
}
