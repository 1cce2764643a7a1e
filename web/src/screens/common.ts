/** Pieces several screens share: a meter's heading with its tabs, and its baseline state. */
import { call, fetchOrThrow } from '../api.js';
import { h } from '../dom.js';
import type { ScreenContext } from '../main.js';
import type { Baseline, Meter } from '../types.js';

export type MeterTab = 'data' | 'bench' | 'savings';

const TABS: { tab: MeterTab; label: string; permission: string }[] = [
  { tab: 'data', label: 'Data', permission: 'read' },
  { tab: 'bench', label: 'Baseline bench', permission: 'read' },
  { tab: 'savings', label: 'Savings', permission: 'savings' },
];

/** The meter's name as the page heading, and links to its three screens (the current one marked). */
export function meterHeading(context: ScreenContext, meter: Meter, current: MeterTab, title: string): HTMLElement {
  context.title(`${title}: ${meter.name}`);
  return h(
    'div',
    { class: 'meter-heading' },
    h('p', { class: 'crumbs' }, h('a', { href: '#/' }, 'Facilities and meters'), ' › ', meter.name),
    h('h1', {}, `${title}: ${meter.name}`),
    h(
      'nav',
      { class: 'tabs', 'aria-label': 'Meter screens' },
      h(
        'ul',
        {},
        ...TABS.filter((t) => context.can(t.permission)).map((t) =>
          h(
            'li',
            {},
            h(
              'a',
              {
                href: `#/meter/${encodeURIComponent(meter.id)}/${t.tab}`,
                'aria-current': t.tab === current ? 'page' : null,
              },
              t.label,
            ),
          ),
        ),
      ),
    ),
  );
}

/** The API paths of a meter, its baseline history and its readings (what the meter screens read first). */
export const meterPaths = {
  meter: (id: string) => `/v1/meters/${encodeURIComponent(id)}`,
  history: (id: string) => `/v1/meters/${encodeURIComponent(id)}/baselines`,
  readings: (id: string) => `/v1/meters/${encodeURIComponent(id)}/readings`,
};

export function getMeter(id: string): Promise<Meter> {
  return fetchOrThrow<Meter>(meterPaths.meter(id));
}

/** The meter's baselines, newest version first (summaries without the fit). */
export async function baselineHistory(meterId: string): Promise<Baseline[]> {
  const answer = await call<{ baselines: Baseline[] }>(meterPaths.history(meterId));
  return answer.ok ? answer.body.baselines : [];
}

export type BaselineState = 'none' | 'draft' | 'frozen';

/** What the meter's savings rest on: its frozen baseline if it has one, else its newest draft. */
export function baselineState(history: readonly Baseline[]): { state: BaselineState; baseline: Baseline | null } {
  const frozen = history.find((b) => b.status === 'frozen');
  const newest = history[0] ?? null;
  if (newest?.status === 'draft') return { state: 'draft', baseline: newest };
  if (frozen) return { state: 'frozen', baseline: frozen };
  return { state: 'none', baseline: null };
}

const STATE_TEXT: Record<BaselineState, string> = { none: 'No baseline', draft: 'Draft', frozen: 'Frozen' };
const STATE_MARK: Record<BaselineState, string> = { none: '○', draft: '◐', frozen: '●' };

/** The state as a badge: a symbol and a word, never colour alone. */
export function stateBadge(state: BaselineState, version?: number): HTMLElement {
  return h(
    'span',
    { class: `badge badge-${state}` },
    h('span', { 'aria-hidden': 'true' }, `${STATE_MARK[state]} `),
    STATE_TEXT[state] + (version !== undefined && state !== 'none' ? ` (v${version})` : ''),
  );
}
