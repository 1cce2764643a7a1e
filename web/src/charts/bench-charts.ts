/**
 * The bench's charts, drawn with the reports' own chart pieces (scales,
 * ticks, palette, safe SVG writing from src/reports/svg):
 * - every fitted shape on the energy signature, each with its own dash
 *   pattern and a label at its end, the chosen one solid and heavier, so no
 *   line is told apart by colour alone;
 * - one shape's energy residuals against time and against temperature.
 * Pure functions of the API's numbers (/v1/baselines/{id}/points): no model
 * value is computed here.
 */
import { coord, element, escapeXml } from '../../../src/reports/svg/xml.js';
import { axisFraction, axisScale, finiteExtent, tickLabel, type AxisScale } from '../../../src/reports/svg/ticks.js';
import { FONT, PALETTE, valueAxis, valueGrid, type PlotBox } from '../../../src/reports/svg/chart-frame.js';
import { dateTicks, dayOf } from '../../../src/reports/svg/date-axis.js';
import type { BaselinePoints, ModelName } from '../types.js';

const WIDTH = 760;
const HEIGHT = 460;
const BOX: PlotBox = { left: 80, right: WIDTH - 96, top: 24, bottom: HEIGHT - 92 };

/** One dash pattern per shape: lines differ by pattern and label, not colour alone. */
export const DASHES: Record<ModelName, string> = {
  '1P': '2 4',
  '2P': '10 4',
  '3PC': '6 3 2 3',
  '3PH': '12 3 3 3',
  '4P': '4 2',
  '5P': '1 3',
};

function open(label: string, description: string, height = HEIGHT): string {
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${WIDTH} ${height}" role="img" aria-label="${escapeXml(label)}" font-family="${escapeXml(FONT)}">`,
    element('title', {}, escapeXml(label)),
    element('desc', {}, escapeXml(description)),
    element('rect', { x: 0, y: 0, width: WIDTH, height, fill: PALETTE.paper }),
  ].join('');
}

function xAxis(
  scale: AxisScale,
  px: (v: number) => number,
  title: string,
  labelOf: (v: number) => string = (v) => tickLabel(v, scale.decimals),
): string {
  const ticks = scale.ticks.map(
    (t) =>
      element('line', { x1: px(t), y1: BOX.bottom, x2: px(t), y2: BOX.bottom + 5 }) +
      element(
        'text',
        { x: px(t), y: BOX.bottom + 20, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.label },
        escapeXml(labelOf(t)),
      ),
  );
  return `<g stroke="${PALETTE.frame}" stroke-width="1.2" font-size="12">${ticks.join('')}${element(
    'text',
    {
      x: (BOX.left + BOX.right) / 2,
      y: BOX.bottom + 44,
      'text-anchor': 'middle',
      stroke: 'none',
      fill: PALETTE.ink,
      'font-size': 13,
    },
    escapeXml(title),
  )}</g>`;
}

/** Every fitted shape on the energy signature; `chosen` drawn solid and heavier, `viewed` given a halo. */
export function candidatesSignatureSvg(points: BaselinePoints, chosen: ModelName): string {
  const degree = points.temperatureUnit === 'F' ? '°F' : '°C';
  const all = [
    ...points.periods.map((p) => ({ temp: p.meanTemp, usePerDay: p.usePerDay })),
    ...points.candidates.flatMap((c) => c.line),
  ];
  const temps = finiteExtent(all.map((p) => p.temp));
  const uses = finiteExtent(all.map((p) => p.usePerDay));
  const x = axisScale(temps?.min ?? 0, temps?.max ?? 1);
  const y = axisScale(Math.min(0, uses?.min ?? 0), uses?.max ?? 1);
  const px = (t: number) => BOX.left + axisFraction(x, t) * (BOX.right - BOX.left);
  const py = (u: number) => BOX.bottom - axisFraction(y, u) * (BOX.bottom - BOX.top);
  const ordered = [...points.candidates].sort((a, b) => (a.model === chosen ? 1 : 0) - (b.model === chosen ? 1 : 0));
  const drawnLines = ordered
    .map((c) => ({ c, drawn: c.line.filter((p) => Number.isFinite(p.temp) && Number.isFinite(p.usePerDay)) }))
    .filter((l) => l.drawn.length >= 2);
  // Labels at the lines' right ends, pushed apart vertically so none hides another.
  const labelY = new Map<ModelName, number>();
  const byEnd = [...drawnLines].sort(
    (a, b) => py(a.drawn[a.drawn.length - 1]!.usePerDay) - py(b.drawn[b.drawn.length - 1]!.usePerDay),
  );
  let previous = Number.NEGATIVE_INFINITY;
  for (const { c, drawn } of byEnd) {
    const y0 = Math.max(py(drawn[drawn.length - 1]!.usePerDay), previous + 14);
    labelY.set(c.model, y0);
    previous = y0;
  }
  const lines = drawnLines.map(({ c, drawn }) => {
    const isChosen = c.model === chosen;
    const end = drawn[drawn.length - 1]!;
    return (
      element('polyline', {
        class: isChosen ? 'line-chosen' : 'line-candidate',
        'data-model': c.model,
        points: drawn.map((p) => `${coord(px(p.temp))},${coord(py(p.usePerDay))}`).join(' '),
        fill: 'none',
        stroke: isChosen ? PALETTE.line : PALETTE.frame,
        'stroke-width': isChosen ? 3.4 : 1.6,
        'stroke-dasharray': isChosen ? 'none' : DASHES[c.model],
        'stroke-opacity': isChosen ? 1 : 0.85,
      }) +
      element(
        'text',
        {
          x: px(end.temp) + 6,
          y: labelY.get(c.model) ?? py(end.usePerDay),
          dy: '0.32em',
          'font-size': isChosen ? 13 : 11,
          'font-weight': isChosen ? '700' : '400',
          fill: isChosen ? PALETTE.line : PALETTE.frame,
        },
        escapeXml(isChosen ? `${c.model} (chosen)` : c.model),
      )
    );
  });
  const marks = points.periods.map((p) =>
    element(
      'circle',
      { cx: px(p.meanTemp), cy: py(p.usePerDay), r: 4.2 },
      element(
        'title',
        {},
        escapeXml(
          `${p.start} to ${p.end}: ${p.meanTemp.toFixed(1)} ${degree}, ${p.usePerDay.toPrecision(4)} ${points.useUnit}/day`,
        ),
      ),
    ),
  );
  const label = `Energy signature: ${points.periods.length} baseline periods and ${points.candidates.length} fitted shapes, ${chosen} chosen`;
  return [
    open(
      label,
      `Use per day (${points.useUnit}/day) against mean outdoor temperature (${degree}). The chosen shape is the solid heavy line; each other shape has its own dash pattern and is labelled at its right end. The numbers are in the table below the chart.`,
    ),
    valueGrid(y, BOX, py),
    valueAxis(y, BOX, py, `Use per day (${points.useUnit}/day)`),
    xAxis(x, px, `Mean outdoor temperature (${degree})`),
    `<g>${lines.join('')}</g>`,
    `<g fill="${PALETTE.baselineFill}" fill-opacity="0.85" stroke="${PALETTE.baselineStroke}" stroke-width="1">${marks.join('')}</g>`,
    legend(points, chosen),
    '</svg>',
  ].join('');
}

function legend(points: BaselinePoints, chosen: ModelName): string {
  const y = HEIGHT - 22;
  let cursor = 24;
  const parts: string[] = [];
  parts.push(
    element('circle', { cx: cursor + 8, cy: y, r: 4.2, fill: PALETTE.baselineFill, stroke: PALETTE.baselineStroke }),
  );
  parts.push(
    element(
      'text',
      { x: cursor + 20, y, dy: '0.32em', 'font-size': 12, fill: PALETTE.label },
      escapeXml(`Baseline periods (${points.periods.length})`),
    ),
  );
  cursor += 190;
  for (const c of points.candidates) {
    const isChosen = c.model === chosen;
    parts.push(
      element('line', {
        x1: cursor,
        y1: y,
        x2: cursor + 28,
        y2: y,
        stroke: isChosen ? PALETTE.line : PALETTE.frame,
        'stroke-width': isChosen ? 3.4 : 1.6,
        'stroke-dasharray': isChosen ? 'none' : DASHES[c.model],
      }),
    );
    parts.push(
      element(
        'text',
        {
          x: cursor + 34,
          y,
          dy: '0.32em',
          'font-size': 12,
          'font-weight': isChosen ? '700' : '400',
          fill: PALETTE.label,
        },
        escapeXml(c.model),
      ),
    );
    cursor += 34 + c.model.length * 8 + 18;
  }
  return `<g class="legend">${parts.join('')}</g>`;
}

const SMALL_HEIGHT = 300;
const SMALL: PlotBox = { left: 80, right: WIDTH - 24, top: 20, bottom: SMALL_HEIGHT - 56 };

/** One shape's energy residuals against time (period midpoints) or against mean temperature, with the zero line. */
export function residualsSvg(points: BaselinePoints, model: ModelName, against: 'time' | 'temperature'): string {
  const candidate = points.candidates.find((c) => c.model === model);
  const degree = points.temperatureUnit === 'F' ? '°F' : '°C';
  const rows = points.periods
    .map((p, i) => {
      const start = dayOf(p.start) ?? 0;
      const end = dayOf(p.end) ?? start;
      return {
        x: against === 'time' ? (start + end) / 2 : p.meanTemp,
        residual: candidate?.residuals[i] ?? null,
        label: `${p.start} to ${p.end}`,
      };
    })
    .filter(
      (r): r is { x: number; residual: number; label: string } => r.residual !== null && Number.isFinite(r.residual),
    );
  const xs = finiteExtent(rows.map((r) => r.x));
  const rs = finiteExtent(rows.map((r) => r.residual));
  const bound = Math.max(Math.abs(rs?.min ?? 1), Math.abs(rs?.max ?? 1));
  const y = axisScale(-bound, bound, 5);
  const py = (v: number) => SMALL.bottom - axisFraction(y, v) * (SMALL.bottom - SMALL.top);
  let xPart: string;
  let px: (v: number) => number;
  if (against === 'time') {
    const from = (xs?.min ?? 0) - 15;
    const to = (xs?.max ?? 1) + 15;
    px = (v: number) => SMALL.left + ((v - from) / (to - from)) * (SMALL.right - SMALL.left);
    const ticks = dateTicks(from, to, 7);
    xPart = `<g stroke="${PALETTE.frame}" font-size="12">${ticks
      .map(
        (t) =>
          element('line', { x1: px(t.day), y1: SMALL.bottom, x2: px(t.day), y2: SMALL.bottom + 5 }) +
          element(
            'text',
            { x: px(t.day), y: SMALL.bottom + 20, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.label },
            escapeXml(t.label),
          ),
      )
      .join(
        '',
      )}${element('text', { x: (SMALL.left + SMALL.right) / 2, y: SMALL.bottom + 44, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.ink, 'font-size': 13 }, 'Period (midpoint)')}</g>`;
  } else {
    const scale = axisScale(xs?.min ?? 0, xs?.max ?? 1);
    px = (v: number) => SMALL.left + axisFraction(scale, v) * (SMALL.right - SMALL.left);
    xPart = `<g stroke="${PALETTE.frame}" font-size="12">${scale.ticks
      .map(
        (t) =>
          element('line', { x1: px(t), y1: SMALL.bottom, x2: px(t), y2: SMALL.bottom + 5 }) +
          element(
            'text',
            { x: px(t), y: SMALL.bottom + 20, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.label },
            escapeXml(tickLabel(t, scale.decimals)),
          ),
      )
      .join(
        '',
      )}${element('text', { x: (SMALL.left + SMALL.right) / 2, y: SMALL.bottom + 44, 'text-anchor': 'middle', stroke: 'none', fill: PALETTE.ink, 'font-size': 13 }, escapeXml(`Mean outdoor temperature (${degree})`))}</g>`;
  }
  const zero = element('line', {
    x1: SMALL.left,
    y1: py(0),
    x2: SMALL.right,
    y2: py(0),
    stroke: PALETTE.ink,
    'stroke-width': 1.4,
    'stroke-dasharray': '5 3',
  });
  const marks = rows.map((r) =>
    element(
      'circle',
      { cx: px(r.x), cy: py(r.residual), r: 4 },
      element('title', {}, escapeXml(`${r.label}: residual ${r.residual.toPrecision(4)} ${points.useUnit}`)),
    ),
  );
  const label = `Residuals of the ${model} shape against ${against === 'time' ? 'time' : 'mean outdoor temperature'}`;
  const open2 = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${WIDTH} ${SMALL_HEIGHT}" role="img" aria-label="${escapeXml(label)}" font-family="${escapeXml(FONT)}">${element('title', {}, escapeXml(label))}${element('desc', {}, escapeXml(`Each period's energy residual (actual minus expected, ${points.useUnit}); the dashed line is zero. The numbers are in the table below.`))}${element('rect', { x: 0, y: 0, width: WIDTH, height: SMALL_HEIGHT, fill: PALETTE.paper })}`;
  return [
    open2,
    valueGrid(y, SMALL, py),
    valueAxis(y, SMALL, py, `Residual (${points.useUnit})`),
    xPart,
    zero,
    `<g fill="${PALETTE.reporting}" fill-opacity="0.8" stroke="${PALETTE.reportingDark}" stroke-width="1">${marks.join('')}</g>`,
    '</svg>',
  ].join('');
}
