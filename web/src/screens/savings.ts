/**
 * Savings of one meter against its frozen baseline: per period actual
 * against adjusted baseline, cumulative savings with its band, and the
 * extrapolation and significance findings. The charts are the savings
 * report's own (src/reports/svg), fed the API's numbers.
 */
import { call } from '../api.js';
import { field, h, notice, replace, svg, table } from '../dom.js';
import { num, pct, span } from '../format.js';
import type { ScreenContext } from '../main.js';
import type { Savings } from '../types.js';
import { renderPeriodComparisonSvg } from '../../../src/reports/svg/period-comparison.js';
import { renderCumulativeSavingsSvg } from '../../../src/reports/svg/cumulative-savings.js';
import { getMeter, meterHeading } from './common.js';

const CONFIDENCES = ['0.68', '0.8', '0.9', '0.95'];

export async function savingsScreen(context: ScreenContext, meterId: string): Promise<void> {
  const meter = await getMeter(meterId);
  const confidence = h(
    'select',
    { name: 'confidence' },
    ...CONFIDENCES.map((c) => h('option', { value: c }, `${Math.round(Number(c) * 100)}%`)),
  );
  const body = h('div', {});
  const load = async () => {
    const answer = await call<Savings>(
      `/v1/meters/${encodeURIComponent(meter.id)}/savings?confidence=${confidence.value}`,
    );
    if (!answer.ok) return replace(body, notice('error', answer.problem.detail));
    const s = answer.body;
    const t = s.totals;
    let running = 0;
    const cumulative = s.periods.map((p) => {
      running += p.savings ?? 0;
      return { end: p.end, value: running };
    });
    const first = s.periods[0];
    const last = s.periods[s.periods.length - 1];
    const level = `${Math.round(t.confidence * 100)}%`;
    replace(
      body,
      h(
        'dl',
        { class: 'totals' },
        h('dt', {}, 'Avoided energy'),
        h('dd', { 'data-total': 'savings', 'data-value': t.savings ?? '' }, `${num(t.savings)} ${meter.unit}`),
        h('dt', {}, `Combined uncertainty (${level})`),
        h(
          'dd',
          {},
          `± ${num(t.uncertainty.combined.absolute)} ${meter.unit} (± ${pct(t.uncertainty.combined.fractional)})`,
        ),
        h('dt', {}, 'Share saved'),
        h('dd', {}, pct(t.fractionSaved)),
        h('dt', {}, 'Adjusted baseline / actual'),
        h('dd', {}, `${num(t.adjustedBaseline)} / ${num(t.actual)} ${meter.unit}`),
        h('dt', {}, 'Significance'),
        h(
          'dd',
          {},
          h('span', { 'aria-hidden': 'true' }, t.significant ? '✔ ' : '✖ '),
          t.significant ? 'significant' : 'not significant',
          h('span', { class: 'sub' }, ` (${s.significance.rule})`),
        ),
        h('dt', {}, 'Extrapolation'),
        h(
          'dd',
          {},
          h('span', { 'aria-hidden': 'true' }, s.extrapolation.exceedsLimit ? '⚠ ' : ''),
          s.extrapolation.summary,
        ),
        h('dt', {}, 'Baseline'),
        h('dd', {}, `version ${s.baselineVersion}, ${s.model}, content hash ${s.baselineContentHash}`),
      ),
      h(
        'figure',
        {},
        svg(
          renderPeriodComparisonSvg({
            title: `${meter.name}: actual against adjusted baseline`,
            unit: meter.unit,
            periods: s.periods.map((p) => ({
              start: p.start,
              end: p.end,
              actual: p.actual ?? Number.NaN,
              adjustedBaseline: p.adjustedBaseline ?? Number.NaN,
              outsideBaselineRange: p.outsideBaselineRange,
            })),
          }),
        ),
        h(
          'figcaption',
          {},
          'Per reporting period: actual use against the adjusted baseline (the frozen model on the period’s weather, plus non-routine adjustments). The numbers are in the table below.',
        ),
      ),
      first && last
        ? h(
            'figure',
            {},
            svg(
              renderCumulativeSavingsSvg({
                title: `${meter.name}: cumulative avoided energy`,
                unit: meter.unit,
                yearStart: first.start,
                yearEnd: last.end,
                guaranteed: null,
                uncertainty: t.uncertainty.combined.absolute,
                points: cumulative,
              }),
            ),
            h('figcaption', {}, `Cumulative avoided energy with its ${level} band at the end.`),
          )
        : null,
      table(
        `Reporting periods of ${meter.name}`,
        [
          'Period',
          'Days',
          'Mean temperature',
          `Actual (${meter.unit})`,
          'Adjusted baseline',
          'Adjustment',
          'Avoided',
          'Cumulative',
          'Outside the baseline’s weather',
        ],
        s.periods.map((p, i) => [
          h('th', { scope: 'row' }, span(p.start, p.end)),
          String(p.days),
          num(p.meanTemp, 1),
          num(p.actual),
          num(p.adjustedBaseline),
          num(p.adjustment),
          num(p.savings),
          num(cumulative[i]!.value),
          p.outsideBaselineRange ? '⚠ yes' : 'no',
        ]),
      ),
      s.adjustments.length > 0
        ? table(
            'Non-routine adjustments',
            ['Period', 'Reason'],
            s.adjustments.map((a) => [span(a.start, a.end), a.reason]),
          )
        : null,
      h(
        'p',
        { class: 'caution' },
        'These figures are estimates under the contract’s M&V plan and the cited methods (IPMVP, ASHRAE Guideline 14); contractual and engineering decisions rest with the parties and a licensed professional, under local rules.',
      ),
    );
  };
  confidence.addEventListener('change', () => void load());
  replace(
    context.main,
    meterHeading(context, meter, 'savings', 'Savings'),
    field('Confidence of the stated uncertainty', confidence),
    body,
  );
  await load();
}
