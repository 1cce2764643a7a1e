/**
 * Reports and statements: open the savings report for a window as tables,
 * download it (HTML, CSV or JSON) with the key in the request header, and
 * list, open, prepare, approve, reject or void savings statements as the
 * key's role allows (the API decides; a refusal is shown as it comes).
 */
import { call, type Problem } from '../api.js';
import { field, h, notice, replace, table } from '../dom.js';
import { num, pct } from '../format.js';
import type { ScreenContext } from '../main.js';
import type { Facility, Statement } from '../types.js';

type WindowKind = 'quarter' | 'contractYear' | 'range';

interface SavingsReportView {
  contentHash: string;
  window?: { from?: string; to?: string; label?: string };
  portfolio: { totals: Record<string, { savings: number | null; uncertainty: number | null }> };
  facilities: {
    id: string;
    name: string;
    totals: Record<string, { savings: number | null; uncertainty: number | null }>;
    meters: {
      id: string;
      name: string;
      unit: string;
      energy: { savings: number | null; uncertainty?: number | null; fractionSaved?: number | null } | null;
    }[];
  }[];
}

function problemNotice(problem: Problem): HTMLElement {
  return notice('error', h('strong', {}, `${problem.title}: `), problem.detail);
}

/** Save a body fetched with the key as a file: the download never puts the key in a URL. */
function saveFile(text: string, type: string, name: string): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = h('a', { href: url, download: name, hidden: true });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

const TYPES = { html: 'text/html', csv: 'text/csv', json: 'application/json' } as const;

function windowControls(): { element: HTMLElement; query: () => Record<string, string> | null } {
  const kind = h(
    'select',
    { name: 'window-kind' },
    h('option', { value: 'quarter' }, 'Quarter'),
    h('option', { value: 'contractYear' }, 'Contract year'),
    h('option', { value: 'range' }, 'Dates'),
  );
  const quarter = h('input', { type: 'text', name: 'quarter', placeholder: '2025-Q4', pattern: '\\d{4}-Q[1-4]' });
  const year = h('input', { type: 'number', name: 'contract-year', min: 1, max: 50, value: 1 });
  const from = h('input', { type: 'date', name: 'from' });
  const to = h('input', { type: 'date', name: 'to' });
  const quarterField = field('Quarter', quarter, 'As YYYY-Qn, e.g. 2025-Q4');
  const yearField = field('Contract year', year);
  const rangeFields = h('div', { class: 'row' }, field('From', from), field('To (end exclusive)', to));
  const show = () => {
    const value = kind.value as WindowKind;
    quarterField.hidden = value !== 'quarter';
    yearField.hidden = value !== 'contractYear';
    rangeFields.hidden = value !== 'range';
  };
  kind.addEventListener('change', show);
  show();
  return {
    element: h('div', { class: 'window' }, field('Window', kind), quarterField, yearField, rangeFields),
    query: (): Record<string, string> | null => {
      const value = kind.value as WindowKind;
      if (value === 'quarter') return quarter.value.trim() ? { quarter: quarter.value.trim() } : null;
      if (value === 'contractYear') return { contractYear: year.value };
      return from.value && to.value ? { from: from.value, to: to.value } : null;
    },
  };
}

function reportSection(): HTMLElement {
  const windows = windowControls();
  const confidence = h(
    'select',
    { name: 'report-confidence' },
    ...['0.68', '0.8', '0.9', '0.95'].map((c) => h('option', { value: c }, `${Math.round(Number(c) * 100)}%`)),
  );
  const output = h('div', { 'aria-live': 'polite' });
  const request = async (format: 'json' | 'csv' | 'html') => {
    const window = windows.query();
    if (!window) {
      replace(output, notice('error', 'Give the window: a quarter, a contract year or both dates.'));
      return null;
    }
    const query = new URLSearchParams({ ...window, confidence: confidence.value, format });
    const answer = await call<string>(`/v1/reports/savings?${query}`, { text: true });
    if (!answer.ok) {
      replace(output, problemNotice(answer.problem));
      return null;
    }
    return { text: answer.body, label: Object.values(window).join('-') };
  };
  const open = h('button', { type: 'submit' }, 'Open');
  const form = h(
    'form',
    { class: 'report', 'aria-labelledby': 'report-title' },
    h('h2', { id: 'report-title' }, 'Savings report'),
    windows.element,
    field('Confidence', confidence),
    h(
      'div',
      { class: 'buttons' },
      open,
      ...(['html', 'csv', 'json'] as const).map((format) => {
        const button = h('button', { type: 'button', class: 'secondary' }, `Download ${format.toUpperCase()}`);
        button.addEventListener('click', () => {
          void request(format).then(
            (got) => got && saveFile(got.text, TYPES[format], `savings-report-${got.label}.${format}`),
          );
        });
        return button;
      }),
    ),
    output,
  );
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    void request('json').then((got) => {
      if (!got) return;
      const report = JSON.parse(got.text) as SavingsReportView;
      const mmbtu = report.portfolio.totals.MMBtu;
      replace(
        output,
        h(
          'p',
          {},
          `Portfolio: ${num(mmbtu?.savings, 1)} ± ${num(mmbtu?.uncertainty, 1)} MMBtu avoided. Content hash ${report.contentHash}.`,
        ),
        table(
          'Avoided energy per meter',
          ['Facility', 'Meter', 'Avoided', '±', 'Share saved'],
          report.facilities.flatMap((f) =>
            f.meters.map((m) => [
              f.name,
              m.name,
              `${num(m.energy?.savings ?? null)} ${m.unit}`,
              num(m.energy?.uncertainty ?? null),
              pct(m.energy?.fractionSaved ?? null),
            ]),
          ),
        ),
      );
    });
  });
  return form;
}

function statementWindow(s: Statement): string {
  const w = s.window as Record<string, unknown> | undefined;
  if (!w) return '—';
  if (typeof w.label === 'string') return w.label;
  if (w.quarter) return String(w.quarter);
  if (w.contractYear) return `contract year ${String(w.contractYear)}`;
  if (w.from && w.to) return `${String(w.from)} to ${String(w.to)}`;
  return JSON.stringify(w);
}

async function statementsSection(context: ScreenContext): Promise<HTMLElement> {
  const section = h(
    'section',
    { 'aria-labelledby': 'statements-title' },
    h('h2', { id: 'statements-title' }, 'Statements'),
  );
  const list = await call<{ statements: Statement[] }>('/v1/statements');
  if (!list.ok) {
    section.append(
      list.status === 404 ? notice('info', 'This service does not offer statements yet.') : problemNotice(list.problem),
    );
    return section;
  }
  const output = h('div', { 'aria-live': 'polite', class: 'statement-output' });
  const redraw = async () => replace(section, await statementsSection(context));
  const act = async (statement: Statement, action: 'approve' | 'reject' | 'void') => {
    let body: Record<string, string> = {};
    if (action !== 'approve') {
      const reason = window.prompt(`Why ${action} this statement?`);
      if (!reason) return;
      body = { reason };
    }
    const answer = await call<Statement>(`/v1/statements/${encodeURIComponent(statement.id)}/${action}`, {
      method: 'POST',
      json: body,
    });
    if (!answer.ok) return replace(output, problemNotice(answer.problem));
    await redraw();
  };
  const openStatement = async (statement: Statement) => {
    const answer = await call<Record<string, unknown>>(`/v1/statements/${encodeURIComponent(statement.id)}`);
    if (!answer.ok) return replace(output, problemNotice(answer.problem));
    const fields = Object.entries(answer.body).filter(
      ([, v]) => v === null || ['string', 'number', 'boolean'].includes(typeof v),
    );
    replace(
      output,
      h('h3', {}, `Statement ${statement.id}`),
      table(
        'The statement',
        ['Field', 'Value'],
        fields.map(([k, v]) => [h('th', { scope: 'row' }, k), v === null ? '—' : String(v)]),
      ),
    );
  };
  const download = async (statement: Statement, format: 'json' | 'csv' | 'html') => {
    const answer = await call<string>(`/v1/statements/${encodeURIComponent(statement.id)}/document?format=${format}`, {
      text: true,
    });
    if (!answer.ok) return replace(output, problemNotice(answer.problem));
    saveFile(answer.body, TYPES[format], `statement-${statement.id}.${format}`);
  };
  const button = (text: string, label: string, onClick: () => void, kind = 'small') => {
    const b = h('button', { type: 'button', class: kind, 'aria-label': label }, text);
    b.addEventListener('click', onClick);
    return b;
  };
  const mayDecide = context.can('savings') && !context.can('data');
  const rows = list.body.statements.map((s) => [
    h('th', { scope: 'row' }, s.id),
    statementWindow(s),
    s.status,
    `${s.preparedBy ?? '—'} ${s.preparedAt ?? ''}`,
    s.approvedAt ? `${s.approvedBy ?? ''} ${s.approvedAt}` : '—',
    h(
      'span',
      { class: 'buttons' },
      button('Open', `Open statement ${s.id}`, () => void openStatement(s)),
      ...(['html', 'csv', 'json'] as const).map((f) =>
        button(f.toUpperCase(), `Download statement ${s.id} as ${f.toUpperCase()}`, () => void download(s, f)),
      ),
      s.status === 'prepared' && mayDecide
        ? button('Approve', `Approve statement ${s.id}`, () => void act(s, 'approve'))
        : null,
      s.status === 'prepared' && mayDecide
        ? button('Reject…', `Reject statement ${s.id}`, () => void act(s, 'reject'))
        : null,
      s.status === 'approved' && context.can('ledger')
        ? button('Void…', `Void statement ${s.id}`, () => void act(s, 'void'))
        : null,
    ),
  ]);
  section.append(
    rows.length === 0
      ? h('p', {}, 'No statements yet.')
      : table('Savings statements', ['Statement', 'Window', 'Status', 'Prepared', 'Approved', 'Actions'], rows),
    output,
  );
  if (context.can('ledger')) section.append(await prepareForm(redraw));
  return section;
}

async function prepareForm(redraw: () => Promise<void>): Promise<HTMLElement> {
  const windows = windowControls();
  const facilities = await call<{ facilities: Facility[] }>('/v1/facilities');
  const facility = h(
    'select',
    { name: 'statement-facility' },
    h('option', { value: '' }, 'Every facility'),
    ...(facilities.ok ? facilities.body.facilities : []).map((f) => h('option', { value: f.id }, f.name)),
  );
  const confidence = h(
    'select',
    { name: 'statement-confidence' },
    ...['0.68', '0.8', '0.9', '0.95'].map((c) => h('option', { value: c }, `${Math.round(Number(c) * 100)}%`)),
  );
  const note = h('input', { type: 'text', name: 'statement-note', maxlength: 2000 });
  const outcome = h('div', { 'aria-live': 'polite' });
  const form = h(
    'form',
    { class: 'prepare', 'aria-labelledby': 'prepare-title' },
    h('h3', { id: 'prepare-title' }, 'Prepare a statement'),
    windows.element,
    field('Facility', facility),
    field('Confidence', confidence),
    field('Note (optional)', note),
    h('button', { type: 'submit' }, 'Prepare'),
    outcome,
  );
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    const window = windows.query();
    if (!window) return replace(outcome, notice('error', 'Give the window: a quarter, a contract year or both dates.'));
    const body: Record<string, unknown> = {
      window: 'contractYear' in window ? { contractYear: Number(window.contractYear) } : window,
      confidence: Number(confidence.value),
    };
    if (facility.value) body.facilityId = facility.value;
    if (note.value.trim()) body.note = note.value.trim();
    void call<Statement>('/v1/statements', { method: 'POST', json: body }).then(async (answer) => {
      if (!answer.ok) return replace(outcome, problemNotice(answer.problem));
      await redraw();
    });
  });
  return form;
}

export async function reportsScreen(context: ScreenContext): Promise<void> {
  context.title('Reports and statements');
  if (!context.can('savings')) {
    replace(
      context.main,
      h('h1', {}, 'Reports and statements'),
      notice('info', 'Reports need the savings permission.'),
    );
    return;
  }
  replace(context.main, h('h1', {}, 'Reports and statements'), reportSection(), await statementsSection(context));
}
