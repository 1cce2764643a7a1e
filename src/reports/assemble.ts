/**
 * The finished report: facility and portfolio roll-ups, the notices a reader
 * must see, the method and unit factors, and the content hash over all of
 * it. Pure: the same inputs always give the same document, byte for byte.
 */
import { canonicalEnergyUnit, energyFactor, ENERGY_FACTOR_SOURCE } from '../engine/index.js';
import { canonicalJson, sha256Hex } from '../lib/canonical-json.js';
import { nonFiniteToNull } from '../lib/non-finite.js';
import { REPORT_CAUTION, reportMethod } from './method.js';
import {
  REPORT_FORMAT,
  REPORT_VERSION,
  type ContractSummary,
  type FacilityReport,
  type GuaranteeStatus,
  type MeterReport,
  type ReportWindow,
  type SavingsReport,
} from './savings-report.js';
import { COMMON_UNITS, commonParts, costParts, sumCommonTotals, sumCosts, type Rollup } from './totals.js';
import type { ResidualCorrelation } from '../engine/index.js';
import { notAvailableNotices } from './not-available.js';

export interface FacilityInput {
  id: string;
  name: string;
  address: string | null;
  contract: ContractSummary | null;
  meters: MeterReport[];
  guarantees: GuaranteeStatus[];
}

export interface ReportInput {
  organisation: { id: string; name: string };
  window: ReportWindow;
  confidence: number;
  confidenceSource?: SavingsReport['confidenceSource'];
  dataAsOf: { auditSeq: number; auditHash: string };
  facilities: FacilityInput[];
  normalYears: SavingsReport['normalYears'];
  /** The pooled between-meter correlation of the report's meters' baseline residuals. */
  correlation: ResidualCorrelation;
}

export function facilityReport(input: FacilityInput, rollup: Rollup): FacilityReport {
  return {
    ...input,
    totals: sumCommonTotals(commonParts(input.meters), rollup),
    cost: sumCosts(costParts(input.meters), rollup),
    metersWithData: input.meters.filter((m) => m.missing === null).length,
  };
}

export function assembleReport(input: ReportInput): SavingsReport {
  const rollup: Rollup = { correlation: input.correlation };
  const facilities = input.facilities.map((facility) => facilityReport(facility, rollup));
  const meters = facilities.flatMap((f) => f.meters);
  const inRollup = meters.filter((m) => m.common !== null);
  const units = [
    ...new Set([
      ...meters.map((m) => canonicalEnergyUnit(m.unit)).filter((u): u is string => u !== undefined),
      ...COMMON_UNITS,
    ]),
  ].sort();

  const portfolio = {
    totals: sumCommonTotals(commonParts(meters), rollup),
    cost: sumCosts(costParts(meters), rollup),
    meters: meters.length,
    metersInRollup: inRollup.length,
  };
  const body: Omit<SavingsReport, 'contentHash'> = {
    format: REPORT_FORMAT,
    version: REPORT_VERSION,
    organisation: input.organisation,
    window: input.window,
    confidence: input.confidence,
    ...(input.confidenceSource !== undefined ? { confidenceSource: input.confidenceSource } : {}),
    dataAsOf: input.dataAsOf,
    portfolio,
    facilities,
    baselines: meters.flatMap((m) =>
      m.baseline && m.missing === null
        ? [
            {
              meterId: m.id,
              baselineId: m.baseline.id,
              version: m.baseline.version,
              contentHash: m.baseline.contentHash,
            },
          ]
        : [],
    ),
    normalYears: input.normalYears,
    rollup: {
      withinStation: input.correlation.withinGroup,
      acrossStations: input.correlation.acrossGroups,
      pairsWithinStation: input.correlation.pairsWithin,
      pairsAcrossStations: input.correlation.pairsAcross,
    },
    method: reportMethod(input.confidence),
    unitFactors: units.map((unit) => {
      const f = energyFactor(unit)!;
      return { unit: f.unit, btu: f.btu, mmbtu: f.mmbtu, gj: f.gj };
    }),
    unitFactorSource: ENERGY_FACTOR_SOURCE,
    notices: [...notices(facilities), ...notAvailableNotices(facilities, portfolio)],
    caution: REPORT_CAUTION,
  };
  const clean = nonFiniteToNull(body) as Omit<SavingsReport, 'contentHash'>;
  return { ...clean, contentHash: reportContentHash(clean) };
}

/** SHA-256 of the canonical JSON of the report without its own hash. */
export function reportContentHash(report: Omit<SavingsReport, 'contentHash'> | SavingsReport): string {
  const { contentHash: _ignored, ...rest } = report as SavingsReport;
  return sha256Hex(canonicalJson(rest));
}

function notices(facilities: readonly FacilityReport[]): string[] {
  return facilities.flatMap(facilityNotices);
}

/** What a reader must know about one facility: meters without figures, notes, missing rates, extrapolation, partial contract years. */
export function facilityNotices(facility: FacilityReport): string[] {
  const out: string[] = [];
  if (facility.metersWithData === 0 && facility.meters.length > 0)
    out.push(
      `${facility.name}: no data in this window: no meter has reporting figures; the facility is left out of the portfolio's sums`,
    );
  for (const meter of facility.meters) {
    const where = `${facility.name}, ${meter.name}`;
    if (meter.missing !== null) out.push(`${where}: no data in this window, left out of the sums: ${meter.missing}`);
    for (const note of meter.notes) out.push(`${where}: ${note}`);
    if (meter.commonNote !== null) out.push(`${where}: ${meter.commonNote}`);
    if (meter.missing === null && meter.cost === null)
      out.push(`${where}: no contract rates: cost avoided is not stated`);
    for (const gap of meter.missingRates) {
      if (meter.cost !== null)
        out.push(`${where}: no contract rate for ${gap.start}..${gap.end}: those periods have no cost avoided`);
    }
    if (meter.excluded.length > 0)
      out.push(
        `${where}: ${meter.excluded.length} reporting reading(s) left out for want of weather (listed in the meter's section)`,
      );
    if (meter.extrapolationShare > 0) {
      out.push(
        `${where}: ${(meter.extrapolationShare * 100).toFixed(1)}% of the model baseline comes from periods outside the baseline's temperature range (extrapolation)`,
      );
    }
  }
  for (const status of facility.guarantees) {
    if (status.metersWithData === 0)
      out.push(
        `${facility.name}: contract year ${status.contractYear}: no data in this window: nothing measured, so no shortfall or surplus is stated`,
      );
    else if (!status.complete)
      out.push(
        `${facility.name}: contract year ${status.contractYear} is not complete: measured through ${status.measuredThrough} against the whole year's guarantee`,
      );
    for (const note of status.notes) out.push(`${facility.name}, contract year ${status.contractYear}: ${note}`);
  }
  return out;
}
