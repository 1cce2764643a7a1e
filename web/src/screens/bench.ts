/**
 * The baseline bench: every fitted shape on the energy signature, one
 * shape's residuals against time and temperature, the statistics table and
 * every reason in words; the engineer (a role with the ledger permission)
 * fits a window, excludes a bill with a reason, picks a shape and freezes
 * after a confirmation that says what freezing means. Every chart has its
 * numbers in a table beside it.
 */
import { call, fetchOrThrow, ScreenError, type Problem } from '../api.js';
import { field, h, notice, replace, svg, table } from '../dom.js';
import { num, pct, sig, span } from '../format.js';
import type { ScreenContext } from '../main.js';
import type { Baseline, BaselinePoints, Candidate, Exclusion, Meter, ModelName, Reading } from '../types.js';
import { candidatesSignatureSvg, residualsSvg } from '../charts/bench-charts.js';
import { baselineHistory, getMeter, meterHeading, meterPaths, stateBadge } from './common.js';

const VERDICT_WORDS: Record<Candidate['verdict'], string> = {
  selected: 'selected by the engine',
  accepted: 'passes screening',
  rejected: 'rejected by screening',
  'not-fitted': 'could not be fitted',
};

/** Exclusions the engineer has asked for and not yet refitted with, per meter (kept for this page view only). */
const pending = new Map<string, Exclusion[]>();

function exclusionsOf(baseline: Baseline): Exclusion[] {
  return baseline.exclusions ?? baseline.fit?.exclusions ?? [];
}

function problemNotice(problem: Problem): HTMLElement {
  return notice(
    'error',
    h('strong', {}, `${problem.title}: `),
    problem.detail,
    problem.errors.length > 1
      ? h('ul', {}, ...problem.errors.map((e) => h('li', {}, `${e.field}: ${e.message}`)))
      : null,
  );
}

function statisticsTable(baseline: Baseline): HTMLElement {
  const candidates = baseline.fit?.candidates ?? [];
  return table(
    'Every candidate shape: verdict and statistics (ASHRAE Guideline 14 definitions; limits from memory of the Guideline)',
    [
      'Shape',
      'Verdict',
      'n',
      'p',
      'R²',
      'CV(RMSE)',
      'NMBE',
      'CV(RMSE) out of sample',
      'Lag-1 ρ',
      'Guideline 14',
      'Changepoints',
    ],
    candidates.map((c) => [
      h('th', { scope: 'row' }, c.model === baseline.chosen ? `${c.model} ✔ chosen` : c.model),
      VERDICT_WORDS[c.verdict] + (c.overFitted ? '; over-fitted out of sample' : ''),
      String(c.n),
      String(c.p),
      sig(c.stats?.r2 ?? null, 3),
      pct(c.stats?.cvrmse ?? null),
      pct(c.stats?.nmbe ?? null, 2),
      pct(c.stats?.outOfSample?.cvrmse ?? null),
      sig(c.stats?.autocorrelation ?? null, 2),
      c.guideline14 ? (c.guideline14.pass ? '✔ passes' : '✖ fails') : '—',
      c.changepoints.length === 0 ? '—' : c.changepoints.map((cp) => `${cp.name} ${sig(cp.estimate, 3)}`).join(', '),
    ]),
  );
}

function reasonsList(baseline: Baseline): HTMLElement {
  const candidates = baseline.fit?.candidates ?? [];
  return h(
    'section',
    { class: 'reasons', 'aria-labelledby': 'reasons-title' },
    h('h2', { id: 'reasons-title' }, 'Why each shape stands where it does'),
    h(
      'dl',
      {},
      ...candidates.flatMap((c) => [
        h('dt', {}, `${c.model}: ${VERDICT_WORDS[c.verdict]}`),
        h(
          'dd',
          {},
          c.reasons.length === 0 ? 'No reason recorded.' : h('ul', {}, ...c.reasons.map((r) => h('li', {}, r))),
        ),
      ]),
    ),
  );
}

function periodsTable(
  points: BaselinePoints,
  model: ModelName,
  readings: readonly Reading[],
  excludeButton: ((reading: Reading) => HTMLElement | null) | null,
): HTMLElement {
  const candidate = points.candidates.find((c) => c.model === model);
  const degree = points.temperatureUnit === 'F' ? '°F' : '°C';
  const headings = [
    'Period',
    'Days',
    `Mean temperature (${degree})`,
    `Use per day (${points.useUnit}/day)`,
    `${model} expected per day`,
    `${model} residual (${points.useUnit})`,
  ];
  if (excludeButton) headings.push('Exclude');
  return table(
    `The numbers behind the charts: each baseline period and the ${model} shape's expected use and residual`,
    headings,
    points.periods.map((p, i) => {
      const reading = readings.find((r) => r.start === p.start && r.end === p.end);
      const cells: (Node | string)[] = [
        h('th', { scope: 'row' }, span(p.start, p.end)),
        String(p.days),
        num(p.meanTemp, 1),
        sig(p.usePerDay, 4),
        sig(candidate?.expectedPerDay[i] ?? null, 4),
        num(candidate?.residuals[i] ?? null, 1),
      ];
      if (excludeButton) cells.push(reading ? (excludeButton(reading) ?? '—') : '—');
      return cells;
    }),
  );
}

function fitForm(
  context: ScreenContext,
  meter: Meter,
  readings: readonly Reading[],
  current: Baseline | null,
  rerender: () => Promise<void>,
): HTMLElement {
  const start = h('input', {
    type: 'date',
    name: 'start',
    required: true,
    value: current?.start ?? readings[0]?.start ?? '',
  });
  const end = h('input', {
    type: 'date',
    name: 'end',
    required: true,
    value: current?.end ?? readings[Math.min(11, readings.length - 1)]?.end ?? '',
  });
  const outcome = h('div', { 'aria-live': 'polite' });
  const exclusions = pending.get(meter.id) ?? (current ? exclusionsOf(current) : []);
  const list =
    exclusions.length === 0
      ? h(
          'p',
          { class: 'sub' },
          'No bill excluded. Use “Exclude…” beside a bill in the table below to leave it out, with your reason.',
        )
      : h(
          'div',
          {},
          h('p', {}, 'Bills to leave out of the fit:'),
          h(
            'ul',
            { class: 'exclusions' },
            ...exclusions.map((e) =>
              h('li', {}, `${e.start && e.end ? span(e.start, e.end) : e.readingId}: ${e.reason}`),
            ),
          ),
          h(
            'button',
            {
              type: 'button',
              class: 'secondary',
              onclick: () => {
                pending.set(meter.id, []);
                void rerender();
              },
            },
            'Fit without exclusions',
          ),
        );
  const form = h(
    'form',
    { class: 'fit', 'aria-labelledby': 'fit-title' },
    h('h2', { id: 'fit-title' }, current ? 'Fit again' : 'Fit a baseline'),
    h(
      'p',
      {},
      'Fits every changepoint shape to the bills lying fully inside the window against the station’s daily weather, and keeps the result as a new draft.',
    ),
    h(
      'div',
      { class: 'row' },
      field('First day of the baseline', start),
      field('Day after the baseline (end exclusive)', end),
    ),
    list,
    h('button', { type: 'submit' }, exclusions.length > 0 ? 'Fit with these exclusions' : 'Fit'),
    outcome,
  );
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    void (async () => {
      replace(outcome, h('p', { role: 'status' }, 'Fitting…'));
      const body: Record<string, unknown> = { start: start.value, end: end.value };
      if (exclusions.length > 0)
        body.exclusions = exclusions.map((e) =>
          e.readingId ? { readingId: e.readingId, reason: e.reason } : { start: e.start, end: e.end, reason: e.reason },
        );
      const answer = await call<Baseline>(`/v1/meters/${encodeURIComponent(meter.id)}/baselines`, {
        method: 'POST',
        json: body,
      });
      if (!answer.ok) return replace(outcome, problemNotice(answer.problem));
      pending.delete(meter.id);
      await rerender();
    })();
  });
  void context;
  return form;
}

function chooseForm(baseline: Baseline, rerender: () => Promise<void>): HTMLElement {
  const fitted = (baseline.fit?.candidates ?? []).filter((c) => c.verdict !== 'not-fitted');
  const outcome = h('div', { 'aria-live': 'polite' });
  const reason = h('textarea', { name: 'choice-reason', rows: 2, required: true, maxlength: 2000 });
  const radios = fitted.map((c) =>
    h(
      'label',
      { class: 'choice' },
      h('input', { type: 'radio', name: 'shape', value: c.model, checked: c.model === baseline.chosen }),
      ` ${c.model}`,
      h('span', { class: 'sub' }, ` (${VERDICT_WORDS[c.verdict]})`),
    ),
  );
  const form = h(
    'form',
    { class: 'choose', 'aria-labelledby': 'choose-title' },
    h('h2', { id: 'choose-title' }, 'Pick a shape'),
    h(
      'fieldset',
      {},
      h('legend', {}, `Shape savings will use (now ${baseline.chosen}; the engine selected ${baseline.selected})`),
      ...radios,
    ),
    field('Why this shape (kept with the baseline and in the audit trail)', reason),
    h('button', { type: 'submit' }, 'Use this shape'),
    outcome,
  );
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    const model = (form.querySelector('input[name=shape]:checked') as HTMLInputElement | null)?.value;
    if (!model) return;
    void (async () => {
      const answer = await call<Baseline>(`/v1/baselines/${encodeURIComponent(baseline.id)}/choose`, {
        method: 'POST',
        json: { model, reason: reason.value },
      });
      if (!answer.ok) return replace(outcome, problemNotice(answer.problem));
      await rerender();
    })();
  });
  return form;
}

function freezeControls(baseline: Baseline, hasFrozen: boolean, rerender: () => Promise<void>): HTMLElement {
  const note = h('textarea', { name: 'freeze-note', rows: 2, required: true, maxlength: 2000 });
  const supersede = h('textarea', { name: 'supersede-reason', rows: 2, maxlength: 2000, required: hasFrozen });
  const shortReason = h('input', { type: 'text', name: 'short-baseline-reason', maxlength: 2000 });
  const outcome = h('div', { 'aria-live': 'polite' });
  const short = baseline.sufficiency && !baseline.sufficiency.sufficient;
  const confirm = h('button', { type: 'submit', class: 'danger' }, `Freeze version ${baseline.version}`);
  const cancel = h('button', { type: 'button', class: 'secondary' }, 'Cancel');
  const dialog = h(
    'dialog',
    { class: 'confirm', 'aria-labelledby': 'freeze-title', 'aria-describedby': 'freeze-meaning' },
    h(
      'form',
      { method: 'dialog' },
      h('h2', { id: 'freeze-title' }, `Freeze baseline version ${baseline.version} (${baseline.chosen})?`),
      h(
        'div',
        { id: 'freeze-meaning' },
        h('p', {}, 'Freezing seals this baseline under a SHA-256 content hash. From then on:'),
        h(
          'ul',
          {},
          h(
            'li',
            {},
            `every savings figure and report for this meter projects exactly this ${baseline.chosen} model onto the reporting weather, never a refit;`,
          ),
          h(
            'li',
            {},
            'it can never be edited: a change means fitting a new version and freezing it with a reason, which supersedes this one on the record;',
          ),
          h('li', {}, 'bills inside its window can no longer be corrected.'),
        ),
      ),
      field('What the freeze rests on (e.g. the M&V plan clause)', note),
      hasFrozen ? field('Why the current frozen baseline is replaced', supersede) : null,
      short ? field(`Why freeze a short baseline (${baseline.sufficiency!.reasons.join('; ')})`, shortReason) : null,
      outcome,
      h('div', { class: 'buttons' }, confirm, cancel),
    ),
  );
  cancel.addEventListener('click', () => dialog.close());
  dialog.querySelector('form')!.addEventListener('submit', (event) => {
    event.preventDefault();
    void (async () => {
      const body: Record<string, unknown> = { note: note.value };
      if (hasFrozen) body.supersedeReason = supersede.value;
      if (short && shortReason.value.trim()) body.overrides = { shortBaseline: { reason: shortReason.value } };
      const answer = await call<Baseline>(`/v1/baselines/${encodeURIComponent(baseline.id)}/freeze`, {
        method: 'POST',
        json: body,
      });
      if (!answer.ok) return replace(outcome, problemNotice(answer.problem));
      dialog.close();
      await rerender();
    })();
  });
  const open = h('button', { type: 'button', class: 'danger' }, 'Freeze…');
  open.addEventListener('click', () => dialog.showModal());
  return h(
    'section',
    { class: 'freeze', 'aria-labelledby': 'freeze-section-title' },
    h('h2', { id: 'freeze-section-title' }, 'Freeze'),
    h('p', {}, 'When the choice is settled, freeze the draft. You will be asked to confirm.'),
    open,
    dialog,
  );
}

/** Everything the bench draws from. */
export interface BenchData {
  meter: Meter;
  history: Baseline[];
  readings: Reading[];
  baseline: Baseline | null;
  points: BaselinePoints | null;
}

/** A meter's newest baseline (or its points): null when it has none yet (404), a refusal thrown. */
async function newest<T>(path: string): Promise<T | null> {
  const answer = await call<T>(path);
  if (answer.ok) return answer.body;
  if (answer.status === 404) return null;
  throw new ScreenError(answer.problem);
}

/**
 * Read what the bench draws, all in one round side by side: the meter, its
 * readings, its baseline history, and its newest baseline with its points
 * (addressed by the meter, so no request waits for another). main.ts starts
 * this beside the key check when the page opens on a bench.
 */
export async function loadBench(meterId: string): Promise<BenchData> {
  const [meter, history, readings, baseline, points] = await Promise.all([
    getMeter(meterId),
    baselineHistory(meterId),
    fetchOrThrow<{ readings: Reading[] }>(meterPaths.readings(meterId)),
    newest<Baseline>(`${meterPaths.history(meterId)}/newest`),
    newest<BaselinePoints>(`${meterPaths.history(meterId)}/newest/points`),
  ]);
  // A fit landing between the reads could pair one version's baseline with another's points: read again.
  if (baseline && points && baseline.id !== points.baselineId) return loadBench(meterId);
  return { meter, history, readings: readings.readings, baseline, points };
}

/**
 * Draw the bench in two steps: the first screenful (the status and every
 * shape on the signature chart) at once, and what lies below it (residuals,
 * the bills, statistics, reasons and forms) in the frame after that one is
 * painted, so the first paint waits only for what is in view. Resolves when
 * the first step is drawn; `complete` when everything is.
 */
async function draw(
  context: ScreenContext,
  meterId: string,
  loading?: Promise<BenchData>,
): Promise<{ complete: Promise<void> }> {
  const { meter, history, readings, baseline, points } = await (loading ?? loadBench(meterId));
  performance.mark('workbench:bench-data');
  const rerender = async () => {
    await (
      await draw(context, meterId)
    ).complete;
  };
  const ledger = context.can('ledger');
  const isDraft = baseline?.status === 'draft';
  const hasFrozen = history.some((b) => b.status === 'frozen');
  const parts: (Node | null)[] = [meterHeading(context, meter, 'bench', 'Baseline bench')];

  if (!baseline || !points) {
    parts.push(notice('info', 'This meter has no baseline yet.'));
    if (ledger) parts.push(fitForm(context, meter, readings, null, rerender));
    replace(context.main, ...parts);
    return { complete: Promise.resolve() };
  }

  parts.push(
    h(
      'p',
      { class: 'status-line' },
      stateBadge(baseline.status === 'draft' ? 'draft' : 'frozen', baseline.version),
      ` ${baseline.status === 'superseded' ? 'superseded, ' : ''}${span(baseline.start, baseline.end)}; ${baseline.temperatureForm === 'daily' ? 'day-resolved' : 'mean-temperature'} form; chosen ${baseline.chosen}, engine's selection ${baseline.selected}.`,
      baseline.contentHash ? h('span', { class: 'hash' }, ` Content hash ${baseline.contentHash}.`) : null,
    ),
  );
  if (baseline.warnings.length > 0)
    parts.push(notice('info', h('ul', {}, ...baseline.warnings.map((w) => h('li', {}, w)))));
  const excluded = exclusionsOf(baseline);
  if (excluded.length > 0) {
    parts.push(
      table(
        'Bills the engineer left out of this fit, with the reasons',
        ['Bill', 'Reason'],
        excluded.map((e) => [e.start && e.end ? span(e.start, e.end) : e.readingId, e.reason]),
      ),
    );
  }
  const leftOut = baseline.fit?.periods.excluded ?? [];
  if (leftOut.length > 0)
    parts.push(
      table(
        'Periods the fit could not use, and why',
        ['Period', 'Reason'],
        leftOut.map((p) => [span(p.start, p.end), p.reason]),
      ),
    );

  // Charts: all shapes on the signature; the viewed shape's residuals.
  const viewSelect = h(
    'select',
    { name: 'residual-shape' },
    ...points.candidates.map((c) => h('option', { value: c.model, selected: c.model === baseline.chosen }, c.model)),
  );
  const residualHolder = h('div', { class: 'residuals' });
  const pendingHere = pending.get(meter.id) ?? [];
  const excludeButton =
    ledger && isDraft
      ? (reading: Reading): HTMLElement | null => {
          if (pendingHere.some((e) => e.start === reading.start && e.end === reading.end))
            return h('span', {}, 'to be excluded');
          const button = h(
            'button',
            { type: 'button', class: 'small', 'aria-label': `Exclude the bill ${span(reading.start, reading.end)}…` },
            'Exclude…',
          );
          button.addEventListener('click', () => {
            const input = h('input', { type: 'text', name: 'exclusion-reason', required: true, maxlength: 2000 });
            const add = h('button', { type: 'submit', class: 'small' }, 'Add');
            const form = h(
              'form',
              { class: 'inline' },
              field(`Why leave out ${reading.start}..${reading.end}`, input),
              add,
            );
            form.addEventListener('submit', (event) => {
              event.preventDefault();
              if (!input.value.trim()) return;
              pending.set(meter.id, [
                ...(pending.get(meter.id) ?? exclusionsOf(baseline)),
                {
                  ...(reading.id ? { readingId: reading.id } : {}),
                  reason: input.value.trim(),
                  start: reading.start,
                  end: reading.end,
                },
              ]);
              void rerender().then(() => document.querySelector<HTMLElement>('#fit-title')?.scrollIntoView());
            });
            button.replaceWith(form);
            input.focus();
          });
          return button;
        }
      : null;
  const tableHolder = h('div', {});
  const showResiduals = () => {
    const model = viewSelect.value as ModelName;
    replace(
      residualHolder,
      h(
        'figure',
        {},
        svg(residualsSvg(points, model, 'time')),
        h(
          'figcaption',
          {},
          `Residuals of ${model} against time: a run of one sign or a drift means something the model does not explain.`,
        ),
      ),
      h(
        'figure',
        {},
        svg(residualsSvg(points, model, 'temperature')),
        h(
          'figcaption',
          {},
          `Residuals of ${model} against temperature: a bend means the shape misses the building’s response.`,
        ),
      ),
    );
    replace(tableHolder, periodsTable(points, model, readings, excludeButton));
  };
  viewSelect.addEventListener('change', showResiduals);

  parts.push(
    h(
      'section',
      { class: 'bench-charts', 'aria-labelledby': 'signature-title' },
      h('h2', { id: 'signature-title' }, 'Energy signature: every fitted shape'),
      h(
        'figure',
        { 'data-chart': 'candidates' },
        svg(candidatesSignatureSvg(points, baseline.chosen)),
        h(
          'figcaption',
          {},
          `Use per day against mean outdoor temperature; the chosen shape (${baseline.chosen}) is the heavy solid line, the others dashed and labelled.`,
        ),
      ),
    ),
  );
  const below = h('div', { class: 'bench-below' });
  replace(context.main, ...parts, below);
  performance.mark('workbench:bench-drawn');

  // What lies below the first screenful, built once that screen is painted.
  const drawBelow = (): void => {
    showResiduals();
    const rest: (Node | null)[] = [];
    rest.push(
      h(
        'section',
        { class: 'bench-residuals', 'aria-labelledby': 'residuals-title' },
        h('h2', { id: 'residuals-title' }, 'Residuals'),
        field('Shape whose residuals are shown', viewSelect),
        residualHolder,
        tableHolder,
      ),
    );
    rest.push(
      h(
        'section',
        { 'aria-labelledby': 'stats-title' },
        h('h2', { id: 'stats-title' }, 'Statistics'),
        statisticsTable(baseline),
      ),
    );
    rest.push(reasonsList(baseline));
    if (ledger) {
      if (isDraft) {
        rest.push(chooseForm(baseline, rerender));
        rest.push(freezeControls(baseline, hasFrozen, rerender));
      }
      rest.push(fitForm(context, meter, readings, baseline, rerender));
    } else {
      rest.push(
        notice(
          'info',
          `The ${context.caller.key.role} role can look at the bench; fitting, choosing and freezing need the ledger permission.`,
        ),
      );
    }
    replace(below, ...rest);
  };
  // Two frames later the browser has painted the first screenful (the benchmark reads this mark).
  const complete = new Promise<void>((resolve) =>
    requestAnimationFrame(() =>
      requestAnimationFrame(() => {
        performance.mark('workbench:bench-painted');
        drawBelow();
        performance.mark('workbench:bench-complete');
        resolve();
      }),
    ),
  );
  return { complete };
}

/** The bench of a meter; `loading` is its data when main.ts started reading it early. */
export async function benchScreen(
  context: ScreenContext,
  meterId: string,
  loading?: Promise<BenchData>,
): Promise<void> {
  await draw(context, meterId, loading);
}
