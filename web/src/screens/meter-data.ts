/**
 * A meter's data: its bills with the weather coverage of each, and upload of
 * a CSV of bills (or of the station's weather). A refused file is shown row
 * by row with the API's row-and-field errors beside the rows they name; the
 * API stores nothing from a refused file.
 */
import { call, fetchOrThrow, type FieldError } from '../api.js';
import { field, h, newId, notice, replace, table } from '../dom.js';
import { num, pct } from '../format.js';
import type { ScreenContext } from '../main.js';
import type { Meter, Observation, Reading } from '../types.js';
import { getMeter, meterHeading } from './common.js';

/** Split CSV text into lines of cells (RFC 4180 quotes), keeping each line's number in the file. */
export function previewCsv(text: string): { line: number; cells: string[] }[] {
  const rows: { line: number; cells: string[] }[] = [];
  const lines = text.replace(/\r\n?/g, '\n').split('\n');
  lines.forEach((raw, i) => {
    if (raw.trim() === '') return;
    const cells: string[] = [];
    let cell = '';
    let quoted = false;
    for (let k = 0; k < raw.length; k++) {
      const c = raw[k]!;
      if (quoted) {
        if (c === '"' && raw[k + 1] === '"') {
          cell += '"';
          k++;
        } else if (c === '"') quoted = false;
        else cell += c;
      } else if (c === '"') quoted = true;
      else if (c === ',') {
        cells.push(cell);
        cell = '';
      } else cell += c;
    }
    cells.push(cell);
    rows.push({ line: i + 1, cells });
  });
  return rows;
}

/** The file line an error names ("row 5, field end" → 5), or null when it names none. */
export function errorLine(error: FieldError): number | null {
  const match = /^row (\d+)/.exec(error.field);
  return match ? Number(match[1]) : null;
}

function coverage(reading: Reading, days: ReadonlySet<string>): number {
  let covered = 0;
  const day = new Date(`${reading.start}T00:00:00Z`);
  for (let i = 0; i < reading.days; i++) {
    if (days.has(day.toISOString().slice(0, 10))) covered++;
    day.setUTCDate(day.getUTCDate() + 1);
  }
  return reading.days > 0 ? covered / reading.days : 0;
}

async function readingsTable(meter: Meter): Promise<HTMLElement> {
  const { readings } = await fetchOrThrow<{ readings: Reading[] }>(
    `/v1/meters/${encodeURIComponent(meter.id)}/readings`,
  );
  if (readings.length === 0) return notice('info', 'No readings yet: upload a CSV of bills below.');
  const from = readings[0]!.start;
  const to = readings[readings.length - 1]!.end;
  const weather = await call<{ observations: Observation[]; temperatureUnit: 'F' | 'C' }>(
    `/v1/weather-stations/${encodeURIComponent(meter.weatherStationId)}/observations?from=${from}&to=${to}`,
  );
  const days = new Set(weather.ok ? weather.body.observations.map((o) => o.date) : []);
  const covered = readings.map((r) => coverage(r, days));
  const short = covered.filter((c) => c < 0.9).length;
  return h(
    'div',
    {},
    h(
      'p',
      {},
      `${readings.length} readings from ${from} to ${to} (end exclusive); ${days.size} days of weather at the meter's station in that span. `,
      short > 0
        ? h('strong', {}, `${short} reading${short === 1 ? '' : 's'} below 90% weather coverage (left out of a fit).`)
        : 'Every reading has at least 90% of its days with weather.',
    ),
    table(
      `Readings of ${meter.name}`,
      [
        'Start',
        'End (exclusive)',
        'Days',
        `Quantity (${meter.unit})`,
        `Per day (${meter.unit}/day)`,
        'Estimated',
        'Cost',
        'Weather coverage',
      ],
      readings.map((r, i) => [
        r.start,
        r.end,
        h('span', { class: 'number' }, String(r.days)),
        num(r.quantity, 1),
        num(r.quantity / r.days, 2),
        r.estimated ? 'estimated' : 'actual',
        r.cost === null ? '—' : num(r.cost, 2),
        covered[i]! < 0.9 ? h('strong', {}, `⚠ ${pct(covered[i]!, 0)}`) : pct(covered[i]!, 0),
      ]),
    ),
  );
}

/** The refused file, row by row, each error beside the row it names. */
function refusedFile(text: string, errors: readonly FieldError[]): HTMLElement {
  const rows = previewCsv(text);
  const byLine = new Map<number, FieldError[]>();
  for (const error of errors) {
    const line = errorLine(error);
    if (line !== null) byLine.set(line, [...(byLine.get(line) ?? []), error]);
  }
  const header = rows[0];
  const width = Math.max(...rows.map((r) => r.cells.length));
  const headings = [
    'Row',
    ...Array.from({ length: width }, (_, i) => header?.cells[i] ?? `column ${i + 1}`),
    'Problem',
  ];
  const body = rows.slice(1).map((row) => {
    const problems = byLine.get(row.line) ?? [];
    const tr = h(
      'tr',
      { class: problems.length > 0 ? 'row-error' : null, 'data-line': row.line },
      h('th', { scope: 'row' }, String(row.line)),
      ...Array.from({ length: width }, (_, i) => h('td', {}, row.cells[i] ?? '')),
      h(
        'td',
        { class: 'row-problem' },
        problems.length > 0
          ? h(
              'span',
              {},
              h('span', { 'aria-hidden': 'true' }, '✖ '),
              problems.map((p) => `${p.field}: ${p.message}`).join('; '),
            )
          : h('span', { class: 'sub' }, 'ok'),
      ),
    );
    return tr;
  });
  const headerProblems = byLine.get(header?.line ?? 1) ?? [];
  return h(
    'div',
    { class: 'refused' },
    headerProblems.length > 0 ? notice('error', `Header: ${headerProblems.map((p) => p.message).join('; ')}`) : null,
    h(
      'table',
      { class: 'data upload-preview' },
      h('caption', {}, 'The refused file, with each problem beside its row'),
      h('thead', {}, h('tr', {}, ...headings.map((name) => h('th', { scope: 'col' }, name)))),
      h('tbody', {}, ...body),
    ),
  );
}

function uploadForm(context: ScreenContext, meter: Meter, refresh: () => Promise<void>): HTMLElement {
  const kind = h(
    'select',
    { name: 'kind' },
    h('option', { value: 'bills' }, 'Bills (start,end,quantity[,estimated,cost])'),
    h('option', { value: 'weather' }, "Weather at the meter's station (date,temp or date,tmin,tmax)"),
  );
  const file = h('input', { type: 'file', name: 'file', accept: '.csv,text/csv', required: true });
  const reason = h('input', { type: 'text', name: 'correction-reason', maxlength: 1000 });
  const outcome = h('div', { class: 'outcome', 'aria-live': 'polite' });
  const form = h(
    'form',
    { class: 'upload', 'aria-labelledby': 'upload-title' },
    h('h2', { id: 'upload-title' }, 'Upload a CSV file'),
    h('p', {}, 'All or nothing: a file with any bad row is refused whole, and each problem is shown beside its row.'),
    field('What the file holds', kind),
    field('CSV file', file),
    field('Correction reason (only when the file changes stored bills)', reason),
    h('button', { type: 'submit' }, 'Upload'),
    outcome,
  );
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    const chosen = file.files?.[0];
    if (!chosen) return;
    void chosen.text().then(async (text) => {
      replace(outcome, h('p', { role: 'status' }, 'Uploading…'));
      const query = reason.value.trim() ? `?correctionReason=${encodeURIComponent(reason.value.trim())}` : '';
      const answer =
        kind.value === 'bills'
          ? await call<{ received: number; created: number; corrected: number; unchanged: number }>(
              `/v1/meters/${encodeURIComponent(meter.id)}/readings${query}`,
              { method: 'POST', csv: text },
            )
          : await call<{ received?: number }>(
              `/v1/weather-stations/${encodeURIComponent(meter.weatherStationId)}/observations`,
              {
                method: 'PUT',
                csv: text,
              },
            );
      if (!answer.ok) {
        replace(
          outcome,
          notice('error', h('strong', {}, 'Refused, nothing stored: '), answer.problem.detail),
          refusedFile(text, answer.problem.errors),
        );
        return;
      }
      const body = answer.body as Record<string, number>;
      const counts = Object.entries(body)
        .filter(([, v]) => typeof v === 'number')
        .map(([k, v]) => `${k} ${v}`)
        .join(', ');
      await refresh();
      replace(outcome, notice('success', `Stored: ${counts}.`));
    });
  });
  void context;
  return form;
}

export async function meterDataScreen(context: ScreenContext, meterId: string): Promise<void> {
  const meter = await getMeter(meterId);
  const holder = h(
    'section',
    { 'aria-labelledby': 'readings-title' },
    h('h2', { id: 'readings-title' }, 'Bills and weather coverage'),
  );
  const list = h('div', { id: newId('readings') });
  holder.append(list);
  const refresh = async () => replace(list, await readingsTable(meter));
  await refresh();
  replace(
    context.main,
    meterHeading(context, meter, 'data', 'Data'),
    context.can('data') ? uploadForm(context, meter, refresh) : null,
    holder,
  );
}
