/**
 * Actual use against the adjusted baseline, period by period, as paired
 * bars: the pale teal bar is what the frozen model says the facility would
 * have used (plus non-routine adjustments), the amber bar what it did use.
 * Periods whose temperature lies outside the baseline's range sit on a grey
 * band with a marker above, because the model extrapolates there.
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
import { dayOf } from './date-axis.js';
import { formatDayNumber } from '../../engine/dates.js';

export interface PeriodComparisonData {
  title: string;
  /** The meter's unit of quantity, e.g. kWh. */
  unit: string;
  periods: {
    start: string;
    end: string;
    actual: number;
    adjustedBaseline: number;
    outsideBaselineRange: boolean;
  }[];
}

const WIDTH = 760;
const HEIGHT = 420;
const BOX: PlotBox = { left: 88, right: WIDTH - 28, top: 78, bottom: HEIGHT - 104 };
const MAX_LABELS = 14;
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;

/** The chart as SVG text; a pure function of its data. */
export function renderPeriodComparisonSvg(data: PeriodComparisonData): string {
  const periods = data.periods;
  const values = finiteExtent(periods.flatMap((p) => [p.actual, p.adjustedBaseline]));
  // Bars start at zero, so the scale always includes it.
  const y = axisScale(Math.min(0, values?.min ?? 0), Math.max(0, values?.max ?? 0));
  const py = (v: number) => BOX.bottom - axisFraction(y, finite(v)) * (BOX.bottom - BOX.top);
  const outside = periods.filter((p) => p.outsideBaselineRange).length;

  const title = truncate(data.title, 70);
  const subtitle =
    periods.length === 0
      ? 'No reporting periods in this window'
      : `${periods.length} reporting period${periods.length === 1 ? '' : 's'}, ${periods[0]!.start} to ${periods[periods.length - 1]!.end} (end exclusive)` +
        (outside > 0 ? `; ${outside} outside the baseline's temperature range` : '');
  const description = `Paired bars per reporting period: adjusted baseline and actual use in ${data.unit}. ${outside} of ${periods.length} periods lie outside the baseline's temperature range.`;

  const parts = [
    chartOpen({ width: WIDTH, height: HEIGHT, chart: 'period-comparison', title, subtitle, description }),
    outsideBands(data),
    valueGrid(y, BOX, py),
    valueAxis(y, BOX, py, `Use per period (${data.unit})`),
    zeroLine(y.min < 0 ? py(0) : null),
    bars(data, py),
    periodLabels(data),
    periods.length === 0 ? plotNote(BOX, 'No reporting periods') : '',
    legend(outside > 0),
    '</svg>',
  ];
  return `${parts.filter((p) => p !== '').join('\n')}\n`;
}

function finite(value: number): number {
  return Number.isFinite(value) ? value : 0;
}

/** Horizontal slot of period i: its left edge and width. */
function slot(i: number, count: number): { x: number; width: number } {
  const width = (BOX.right - BOX.left) / Math.max(1, count);
  return { x: BOX.left + i * width, width };
}

function outsideBands(data: PeriodComparisonData): string {
  const n = data.periods.length;
  const marks: string[] = [];
  data.periods.forEach((p, i) => {
    if (!p.outsideBaselineRange) return;
    const s = slot(i, n);
    const cx = s.x + s.width / 2;
    const top = BOX.top + 4;
    const tip = `${p.start} to ${p.end}: outside the baseline's temperature range (the model extrapolates)`;
    marks.push(
      element('rect', {
        class: 'band-outside',
        x: s.x + 1,
        y: BOX.top,
        width: Math.max(0, s.width - 2),
        height: BOX.bottom - BOX.top,
        fill: PALETTE.outside,
      }),
    );
    marks.push(
      element(
        'path',
        {
          class: 'mark-outside',
          d: `M${coord(cx - 5)} ${coord(top)}H${coord(cx + 5)}L${coord(cx)} ${coord(top + 8)}Z`,
          fill: PALETTE.frame,
        },
        element('title', {}, escapeXml(tip)),
      ),
    );
  });
  return marks.length === 0 ? '' : `<g class="outside-range">${marks.join('')}</g>`;
}

function zeroLine(y: number | null): string {
  return y === null
    ? ''
    : element('line', {
        class: 'zero-line',
        x1: BOX.left,
        y1: y,
        x2: BOX.right,
        y2: y,
        stroke: PALETTE.frame,
        'stroke-width': 1,
      });
}

function bars(data: PeriodComparisonData, py: (v: number) => number): string {
  const n = data.periods.length;
  const baselineBars: string[] = [];
  const actualBars: string[] = [];
  const zero = py(0);
  data.periods.forEach((p, i) => {
    const s = slot(i, n);
    const barWidth = Math.min(26, s.width * 0.34);
    const gap = Math.min(3, s.width * 0.04);
    const centre = s.x + s.width / 2;
    const bar = (value: number, x: number, cls: string, what: string) =>
      element(
        'rect',
        { class: cls, x, y: Math.min(py(value), zero), width: barWidth, height: Math.abs(py(value) - zero) },
        element(
          'title',
          {},
          escapeXml(
            `${p.start} to ${p.end}: ${what} ${Number.isFinite(value) ? tickLabel(Number(value.toFixed(2)), 2) : 'n/a'} ${data.unit}`,
          ),
        ),
      );
    baselineBars.push(bar(p.adjustedBaseline, centre - gap / 2 - barWidth, 'bar-baseline', 'adjusted baseline'));
    actualBars.push(bar(p.actual, centre + gap / 2, 'bar-actual', 'actual'));
  });
  if (n === 0) return '';
  return [
    `<g fill="${PALETTE.baselinePale}" stroke="${PALETTE.baselineStroke}" stroke-width="1.2">${baselineBars.join('')}</g>`,
    `<g fill="${PALETTE.reporting}" stroke="${PALETTE.reportingDark}" stroke-width="1">${actualBars.join('')}</g>`,
  ].join('');
}

/** Under each labelled slot: day and month of the period's start, and the year where it changes. */
function periodLabels(data: PeriodComparisonData): string {
  const n = data.periods.length;
  if (n === 0) return '';
  const every = Math.ceil(n / MAX_LABELS);
  const labels: string[] = [];
  let lastYear = '';
  data.periods.forEach((p, i) => {
    if (i % every !== 0) return;
    const day = dayOf(p.start);
    const s = slot(i, n);
    const cx = s.x + s.width / 2;
    const [year, month, dayOfMonth] = day === null ? ['', '', ''] : formatDayNumber(day).split('-');
    const first = day === null ? truncate(p.start, 12) : `${Number(dayOfMonth)} ${MONTHS[Number(month) - 1]}`;
    labels.push(element('line', { x1: cx, y1: BOX.bottom, x2: cx, y2: BOX.bottom + 5 }));
    labels.push(
      element(
        'text',
        { x: cx, y: BOX.bottom + 19, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.label },
        escapeXml(first),
      ),
    );
    if (year !== undefined && year !== '' && year !== lastYear) {
      labels.push(
        element(
          'text',
          {
            x: cx,
            y: BOX.bottom + 34,
            'text-anchor': 'middle',
            stroke: 'none',
            fill: PALETTE.frame,
            'font-weight': '600',
          },
          escapeXml(year),
        ),
      );
      lastYear = year;
    }
  });
  const axisTitle = element(
    'text',
    {
      class: 'axis-title',
      x: (BOX.left + BOX.right) / 2,
      y: BOX.bottom + 58,
      'text-anchor': 'middle',
      stroke: 'none',
      fill: PALETTE.ink,
      'font-size': 13,
    },
    escapeXml('Reporting period (start date)'),
  );
  return `<g class="period-labels" stroke="${PALETTE.frame}" stroke-width="1.2" font-size="11.5">${labels.join('')}${axisTitle}</g>`;
}

function legend(withOutside: boolean): string {
  const items: LegendItem[] = [
    {
      label: 'Adjusted baseline',
      swatch: (x, y) =>
        element('rect', {
          x,
          y: y - 6,
          width: 16,
          height: 12,
          fill: PALETTE.baselinePale,
          stroke: PALETTE.baselineStroke,
          'stroke-width': 1.2,
        }),
    },
    {
      label: 'Actual use',
      swatch: (x, y) =>
        element('rect', { x, y: y - 6, width: 16, height: 12, fill: PALETTE.reporting, stroke: PALETTE.reportingDark }),
    },
  ];
  if (withOutside) {
    items.push({
      label: "Outside the baseline's temperature range",
      swatch: (x, y) =>
        element('rect', { x, y: y - 8, width: 16, height: 16, fill: PALETTE.outside }) +
        element('path', {
          d: `M${coord(x + 3)} ${coord(y - 5)}H${coord(x + 13)}L${coord(x + 8)} ${coord(y + 3)}Z`,
          fill: PALETTE.frame,
        }),
    });
  }
  return legendRow(items, BOX.left, HEIGHT - 20);
}
