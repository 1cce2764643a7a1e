/**
 * What GHCN-Daily says about elements and flags, shared by its fixed-width
 * (.dly) and per-station CSV forms. Source: NOAA NCEI, GHCN-Daily readme.txt,
 * section III (https://www.ncei.noaa.gov/pub/data/ghcn/daily/readme.txt).
 */
import { celsiusToFahrenheit, type TemperatureUnit } from '../engine/index.js';
import type { ArchiveCounts, ArchiveDay } from './types.js';

/** The temperature elements the ledger reads; values in tenths of °C. */
export const TEMPERATURE_ELEMENTS = ['TMAX', 'TMIN', 'TAVG'] as const;
export type TemperatureElement = (typeof TEMPERATURE_ELEMENTS)[number];

/** The missing-value marker of both forms. */
export const GHCN_MISSING = -9999;

/**
 * Element codes the readme lists (core, other, and the numbered families
 * SN*#, SX*#, WT**, WV**). A code outside them is not GHCN-Daily: refused.
 */
const NAMED_ELEMENTS = new Set(
  (
    'PRCP SNOW SNWD TMAX TMIN TAVG ACMC ACMH ACSC ACSH ADPT ASLP ASTP AWBT AWDR AWND DAEV DAPR DASF DATN DATX DAWM DWPR ' +
    'EVAP FMTM FRGB FRGT FRTH GAHT MDEV MDPR MDSF MDTN MDTX MDWM MNPN MXPN PGTM PSUN RHAV RHMN RHMX THIC TOBS TSUN ' +
    'WDF1 WDF2 WDF5 WDFG WDFI WDFM WDMV WESD WESF WSF1 WSF2 WSF5 WSFG WSFI WSFM'
  ).split(' '),
);
const NUMBERED_ELEMENT = /^(S[NX][0-8][1-7]|W[TV]\d\d)$/;

export function isGhcnElement(code: string): boolean {
  return NAMED_ELEMENTS.has(code) || NUMBERED_ELEMENT.test(code);
}

export function isTemperatureElement(code: string): code is TemperatureElement {
  return code === 'TMAX' || code === 'TMIN' || code === 'TAVG';
}

/**
 * The readme's Q-FLAG: blank means the value did not fail any quality
 * assurance check; any other letter names the check it failed. So a value
 * with a non-blank Q-FLAG is refused.
 */
export function failsQuality(qflag: string): boolean {
  return qflag.trim() !== '';
}

/** Tenths of °C → the station's unit, in one step (NIST SP 811: t/°F = 1.8·t/°C + 32, exact). */
export function tenthsCelsiusTo(value: number, unit: TemperatureUnit): number {
  const celsius = value / 10;
  return unit === 'C' ? celsius : celsiusToFahrenheit(celsius);
}

/** The passing temperature values of one day, in tenths of °C. */
export interface GhcnDayValues {
  TMAX?: number;
  TMIN?: number;
  TAVG?: number;
  line: number;
}

export const GHCN_METHOD =
  'daily mean = (TMAX + TMIN)/2 where both pass their quality check, else TAVG; values with a non-blank quality flag refused; tenths of °C converted once to the station unit';

/**
 * Days from the collected values: (TMIN, TMAX) where both are usable (the
 * mean is then (TMIN + TMAX)/2, the ledger's common-practice daily mean),
 * else TAVG; a day with neither is missing.
 */
export function ghcnDays(
  byDate: ReadonlyMap<string, GhcnDayValues>,
  unit: TemperatureUnit,
  counts: ArchiveCounts,
): ArchiveDay[] {
  const days: ArchiveDay[] = [];
  for (const date of [...byDate.keys()].sort()) {
    const values = byDate.get(date)!;
    counts.daysRead++;
    if (values.TMAX !== undefined && values.TMIN !== undefined) {
      days.push({
        date,
        tmin: tenthsCelsiusTo(values.TMIN, unit),
        tmax: tenthsCelsiusTo(values.TMAX, unit),
        line: values.line,
      });
    } else if (values.TAVG !== undefined) {
      days.push({ date, temp: tenthsCelsiusTo(values.TAVG, unit), line: values.line });
    } else {
      counts.missing++;
      continue;
    }
    counts.imported++;
  }
  return days;
}

/** Record a refused value. */
export function countDropped(counts: ArchiveCounts, qflag: string): void {
  counts.droppedByFlag++;
  const flag = qflag.trim();
  counts.droppedFlags[flag] = (counts.droppedFlags[flag] ?? 0) + 1;
}

/** The day's entry, made on first sight (its line is the first line that named it). */
export function dayEntry(byDate: Map<string, GhcnDayValues>, date: string, line: number): GhcnDayValues {
  let entry = byDate.get(date);
  if (!entry) {
    entry = { line };
    byDate.set(date, entry);
  }
  return entry;
}
