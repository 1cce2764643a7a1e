/**
 * What changed between a statement's report and the same request rendered
 * on today's data: readings added, removed or corrected, baselines
 * superseded, adjustments added or withdrawn, contract terms and figures
 * that moved. Pure: two reports in, a list of changes out, so a late
 * correction is visible rather than silent.
 */
import { canonicalJson } from '../../lib/canonical-json.js';
import type { MeterReport, SavingsReport } from '../savings-report.js';

/** The report without what always moves (the audit head it names, and its own hash). */
function figuresOf(report: SavingsReport): string {
  const { dataAsOf: _head, contentHash: _hash, ...rest } = report;
  return canonicalJson(rest);
}

export type ChangeKind =
  | 'reading-added'
  | 'reading-removed'
  | 'reading-corrected'
  | 'baseline-superseded'
  | 'baseline-frozen'
  | 'baseline-gone'
  | 'adjustment-added'
  | 'adjustment-withdrawn'
  | 'adjustment-changed'
  | 'contract-changed'
  | 'meter-added'
  | 'meter-removed'
  | 'savings-changed'
  | 'cost-changed'
  | 'other-figures-changed';

export interface StatementChange {
  kind: ChangeKind;
  facilityId: string | null;
  meterId: string | null;
  /** In words, naming the meter and the figures. */
  description: string;
  before: number | string | null;
  after: number | string | null;
}

/** Relative change below which two figures count as the same (rounding in the last digits). */
const SAME = 1e-9;

function differ(a: number | null | undefined, b: number | null | undefined): boolean {
  if (a === null || a === undefined || b === null || b === undefined) return (a ?? null) !== (b ?? null);
  return Math.abs(a - b) > SAME * Math.max(1, Math.abs(a), Math.abs(b));
}

function metersOf(report: SavingsReport): Map<string, { facilityId: string; meter: MeterReport }> {
  const out = new Map<string, { facilityId: string; meter: MeterReport }>();
  for (const f of report.facilities) for (const m of f.meters) out.set(m.id, { facilityId: f.id, meter: m });
  return out;
}

/** Every change from `issued` to `today`, meter by meter in the issued report's order, then new meters. */
export function compareReports(issued: SavingsReport, today: SavingsReport): StatementChange[] {
  const changes: StatementChange[] = [];
  const before = metersOf(issued);
  const after = metersOf(today);
  for (const f of issued.facilities) {
    const now = today.facilities.find((x) => x.id === f.id);
    if (now && JSON.stringify(f.contract) !== JSON.stringify(now.contract)) {
      changes.push({
        kind: 'contract-changed',
        facilityId: f.id,
        meterId: null,
        description: `${f.name}: the contract's terms changed since issue`,
        before: null,
        after: null,
      });
    }
  }
  for (const [id, { facilityId, meter: old }] of before) {
    const current = after.get(id);
    const where = old.name;
    const push = (
      kind: ChangeKind,
      description: string,
      b: StatementChange['before'] = null,
      a: StatementChange['after'] = null,
    ) => changes.push({ kind, facilityId, meterId: id, description: `${where}: ${description}`, before: b, after: a });
    if (!current) {
      push('meter-removed', 'the meter is no longer in the report');
      continue;
    }
    const meter = current.meter;
    if (old.baseline && meter.baseline && old.baseline.id !== meter.baseline.id)
      push(
        'baseline-superseded',
        `frozen baseline ${old.baseline.id} (version ${old.baseline.version}) was superseded by ${meter.baseline.id} (version ${meter.baseline.version})`,
        old.baseline.contentHash,
        meter.baseline.contentHash,
      );
    else if (!old.baseline && meter.baseline)
      push('baseline-frozen', `a baseline was frozen: ${meter.baseline.id}`, null, meter.baseline.contentHash);
    else if (old.baseline && !meter.baseline)
      push('baseline-gone', `frozen baseline ${old.baseline.id} no longer applies`, old.baseline.contentHash, null);

    const periods = new Map(old.periods.map((p) => [`${p.start}/${p.end}`, p]));
    const nowPeriods = new Map(meter.periods.map((p) => [`${p.start}/${p.end}`, p]));
    for (const [key, p] of periods) {
      const q = nowPeriods.get(key);
      if (!q) push('reading-removed', `reading ${p.start}..${p.end} no longer counts`, p.actual, null);
      else if (differ(p.actual, q.actual))
        push(
          'reading-corrected',
          `reading ${p.start}..${p.end} was corrected from ${p.actual} to ${q.actual} ${meter.unit}`,
          p.actual,
          q.actual,
        );
    }
    for (const [key, q] of nowPeriods) {
      if (!periods.has(key))
        push('reading-added', `reading ${q.start}..${q.end} (${q.actual} ${meter.unit}) now counts`, null, q.actual);
    }

    const adjustments = new Map(old.adjustments.map((a) => [a.id, a]));
    const nowAdjustments = new Map(meter.adjustments.map((a) => [a.id, a]));
    for (const [key, a] of adjustments) {
      const b = nowAdjustments.get(key);
      if (!b)
        push('adjustment-withdrawn', `adjustment ${a.id} (${a.reason}) no longer applies`, a.appliedInWindow, null);
      else if (differ(a.appliedInWindow, b.appliedInWindow))
        push(
          'adjustment-changed',
          `adjustment ${a.id} now applies ${b.appliedInWindow} ${meter.unit}`,
          a.appliedInWindow,
          b.appliedInWindow,
        );
    }
    for (const [key, b] of nowAdjustments) {
      if (!adjustments.has(key))
        push('adjustment-added', `adjustment ${b.id} (${b.reason}) was added`, null, b.appliedInWindow);
    }

    const s0 = old.energy?.savings ?? null;
    const s1 = meter.energy?.savings ?? null;
    if (differ(s0, s1))
      push('savings-changed', `avoided energy moved from ${s0 ?? 'none'} to ${s1 ?? 'none'} ${meter.unit}`, s0, s1);
    const c0 = old.cost?.avoided ?? null;
    const c1 = meter.cost?.avoided ?? null;
    if (differ(c0, c1)) push('cost-changed', `cost avoided moved from ${c0 ?? 'none'} to ${c1 ?? 'none'}`, c0, c1);
  }
  for (const [id, { facilityId, meter }] of after) {
    if (!before.has(id))
      changes.push({
        kind: 'meter-added',
        facilityId,
        meterId: id,
        description: `${meter.name}: a meter now in the report that was not at issue`,
        before: null,
        after: meter.energy?.savings ?? null,
      });
  }
  if (changes.length === 0 && figuresOf(issued) !== figuresOf(today)) {
    changes.push({
      kind: 'other-figures-changed',
      facilityId: null,
      meterId: null,
      description:
        'figures other than readings, baselines, adjustments, savings and cost moved (e.g. rates, normal years, notices): compare the two reports',
      before: issued.contentHash,
      after: today.contentHash,
    });
  }
  return changes;
}
