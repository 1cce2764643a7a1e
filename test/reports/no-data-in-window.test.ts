/**
 * A facility or meter with no reporting figures in the window. Check values:
 * synthetic (the hand-built sample report sets the truth; the test empties
 * one facility of figures).
 */
import { describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { assembleReport, type FacilityInput } from '../../src/reports/assemble.js';
import { guaranteeStatus } from '../../src/reports/guarantees.js';
import { missingMeterReport } from '../../src/reports/meter-report.js';
import { CSV_COLUMNS, renderReportCsv } from '../../src/reports/csv.js';
import { renderReportHtml } from '../../src/reports/html/render-report.js';
import { IDS, SAMPLE_REPORT } from './fixtures/sample-report.js';

const REASON = 'no reporting readings in 2026-04-01..2026-07-01';

/** The sample report re-assembled with the sports hall's every meter missing from the window. */
function reportWithEmptyHall() {
  const facilities: FacilityInput[] = SAMPLE_REPORT.facilities.map((f) => {
    if (f.id !== IDS.hall)
      return {
        id: f.id,
        name: f.name,
        address: f.address,
        contract: f.contract,
        meters: f.meters,
        guarantees: f.guarantees,
      };
    const meters = f.meters.map((m) =>
      missingMeterReport(
        {
          id: m.id,
          name: m.name,
          fuel: m.fuel,
          unit: m.unit,
          weatherStationId: m.weatherStationId,
          temperatureUnit: m.temperatureUnit,
        },
        m.baseline,
        REASON,
        [],
      ),
    );
    const status = f.guarantees[0]!;
    const guarantees = [
      guaranteeStatus(f.contract!, {
        contractYear: status.contractYear,
        yearStart: status.yearStart,
        yearEnd: status.yearEnd,
        measuredThrough: status.measuredThrough,
        complete: status.complete,
        meters,
      }),
    ];
    return { id: f.id, name: f.name, address: f.address, contract: f.contract, meters, guarantees };
  });
  return assembleReport({
    organisation: SAMPLE_REPORT.organisation,
    window: SAMPLE_REPORT.window,
    confidence: SAMPLE_REPORT.confidence,
    dataAsOf: SAMPLE_REPORT.dataAsOf,
    facilities,
    normalYears: SAMPLE_REPORT.normalYears,
    correlation: { withinGroup: null, acrossGroups: null, pairsWithin: 0, pairsAcross: 0, method: 'none' },
  });
}

describe('facilities and meters with no reporting data showed "0.0 ± 0.0" and large "behind" differences', () => {
  const report = reportWithEmptyHall();
  const hall = report.facilities.find((f) => f.id === IDS.hall)!;
  const library = report.facilities.find((f) => f.id === IDS.library)!;

  it('marks the facility and its contract year as having no data, and leaves them out of the sums with a notice', () => {
    expect(hall.metersWithData).toBe(0);
    expect(hall.guarantees[0]!.metersWithData).toBe(0);
    expect(library.metersWithData).toBeGreaterThan(0);
    // The portfolio is the library's alone: the empty hall adds nothing.
    expect(report.portfolio.totals.MMBtu.savings).toBeCloseTo(library.totals.MMBtu.savings, 9);
    expect(report.notices).toContain(
      `${hall.name}: no data in this window: no meter has reporting figures; the facility is left out of the portfolio's sums`,
    );
    expect(report.notices.some((n) => n.includes('no data in this window, left out of the sums: ' + REASON))).toBe(
      true,
    );
    expect(
      report.notices.some((n) =>
        n.includes(`contract year ${hall.guarantees[0]!.contractYear}: no data in this window`),
      ),
    ).toBe(true);
  });

  it('shows "no data in this window" in the HTML, never 0.0 ± 0.0 or a verdict for the empty facility', () => {
    const html = renderReportHtml(report);
    const section = html.slice(html.indexOf(`id="facility-${IDS.hall}"`));
    expect(section).toContain('No data in this window.');
    expect(section).not.toContain('0.0 ± 0.0');
    expect(section).not.toContain('Behind so far');
    expect(section).not.toContain(`data-total="facility-${IDS.hall}-savings-MMBtu"`);
    const breakdown = html.slice(html.indexOf('facility-breakdown'), html.indexOf('guarantees-summary'));
    expect(breakdown).toContain('no data in this window (left out of the sums)');
  });

  it('writes no totals or difference for the empty facility in the CSV, only the words', () => {
    const table = parse(renderReportCsv(report)) as string[][];
    const col = (name: (typeof CSV_COLUMNS)[number]) => CSV_COLUMNS.indexOf(name);
    const hallRows = table.filter((r) => r[col('facility_id')] === IDS.hall);
    const facilityRows = hallRows.filter((r) => r[0] === 'facility');
    expect(facilityRows).toHaveLength(1);
    expect(facilityRows[0]![col('savings')]).toBe('');
    expect(facilityRows[0]![col('note')]).toBe('no data in this window (left out of the sums)');
    const guarantee = hallRows.find((r) => r[0] === 'guarantee')!;
    expect(guarantee[col('difference')]).toBe('');
    expect(guarantee[col('savings')]).toBe('');
    expect(guarantee[col('note')]).toContain('no data in this window');
  });
});
