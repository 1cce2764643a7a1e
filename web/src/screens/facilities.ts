/** Facilities and meters: each meter's baseline state and its savings to date, with links to its screens. */
import { call, fetchOrThrow } from '../api.js';
import { h, notice, replace, table } from '../dom.js';
import { num, pct } from '../format.js';
import type { ScreenContext } from '../main.js';
import type { Facility, Meter, Savings } from '../types.js';
import { baselineHistory, baselineState, stateBadge } from './common.js';

async function meterRow(context: ScreenContext, meter: Meter): Promise<HTMLTableRowElement> {
  const history = await baselineHistory(meter.id);
  const { state, baseline } = baselineState(history);
  let savings: HTMLElement | string = '—';
  if (state === 'frozen' || history.some((b) => b.status === 'frozen')) {
    if (context.can('savings')) {
      const answer = await call<Savings>(`/v1/meters/${encodeURIComponent(meter.id)}/savings`);
      if (answer.ok) {
        const t = answer.body.totals;
        const last = answer.body.periods[answer.body.periods.length - 1];
        savings = h(
          'span',
          {},
          `${num(t.savings)} ± ${num(t.uncertainty.combined.absolute)} ${meter.unit} (${pct(t.fractionSaved)} saved)`,
          last ? h('span', { class: 'sub' }, ` to ${last.end}`) : null,
        );
      } else savings = h('span', { class: 'sub' }, answer.problem.detail);
    }
  }
  const link = (tab: string, text: string) => h('a', { href: `#/meter/${encodeURIComponent(meter.id)}/${tab}` }, text);
  return h(
    'tr',
    {},
    h('th', { scope: 'row' }, meter.name),
    h('td', {}, `${meter.fuel}, ${meter.unit}`),
    h('td', {}, stateBadge(state, baseline?.version)),
    h('td', { class: 'number' }, savings),
    h(
      'td',
      { class: 'actions' },
      link('data', 'Data'),
      ' · ',
      link('bench', 'Bench'),
      context.can('savings') ? ' · ' : null,
      context.can('savings') ? link('savings', 'Savings') : null,
    ),
  );
}

export async function facilitiesScreen(context: ScreenContext): Promise<void> {
  context.title('Facilities and meters');
  if (!context.can('read')) {
    replace(
      context.main,
      h('h1', {}, 'Facilities and meters'),
      notice(
        'info',
        `The ${context.caller.key.role} role posts data and reads savings through the API; the workbench's screens need the read permission.`,
      ),
    );
    return;
  }
  const { facilities } = await fetchOrThrow<{ facilities: Facility[] }>('/v1/facilities');
  const sections = await Promise.all(
    facilities.map(async (facility) => {
      const { meters } = await fetchOrThrow<{ meters: Meter[] }>(
        `/v1/facilities/${encodeURIComponent(facility.id)}/meters`,
      );
      const rows = await Promise.all(meters.map((meter) => meterRow(context, meter)));
      const body =
        meters.length === 0
          ? h('p', {}, 'No meters yet.')
          : table(
              `Meters of ${facility.name}`,
              ['Meter', 'Fuel and unit', 'Baseline', 'Avoided energy to date', 'Screens'],
              [],
            );
      if (body instanceof HTMLTableElement) body.tBodies[0]!.append(...rows);
      return h(
        'section',
        { class: 'facility', 'aria-labelledby': `facility-${facility.id}` },
        h('h2', { id: `facility-${facility.id}` }, facility.name),
        facility.address ? h('p', { class: 'sub' }, facility.address) : null,
        body,
      );
    }),
  );
  replace(
    context.main,
    h('h1', {}, 'Facilities and meters'),
    h(
      'p',
      { class: 'lede' },
      'Each meter with the state of its baseline (none, draft or frozen) and the avoided energy against its frozen baseline, with the combined uncertainty at 68% confidence.',
    ),
    facilities.length === 0 ? notice('info', 'No facilities yet.') : null,
    ...sections,
  );
}
