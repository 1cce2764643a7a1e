/**
 * Which of a period's days rest on filled weather, so every period that uses
 * a filled day says so ("3 of 31 days filled by interpolation").
 */
import { formatDayNumber, parseIsoDate } from './dates.js';
import type { FillMethod } from './weather-gaps.js';

export interface PeriodFills {
  start: string;
  end: string;
  days: number;
  interpolation: number;
  secondStation: number;
  /** In words: "3 of 31 days filled by interpolation, 2 from a second station". */
  summary: string;
}

/** The periods (in the order given) with at least one filled day, with their counts. */
export function filledDaysByPeriod(
  periods: readonly { start: string; end: string }[],
  filled: ReadonlyMap<string, FillMethod>,
): PeriodFills[] {
  if (filled.size === 0) return [];
  const result: PeriodFills[] = [];
  for (const period of periods) {
    const first = parseIsoDate(period.start)!;
    const days = parseIsoDate(period.end)! - first;
    let interpolation = 0;
    let secondStation = 0;
    for (let d = first; d < first + days; d++) {
      const method = filled.get(formatDayNumber(d));
      if (method === 'interpolation') interpolation++;
      else if (method === 'second-station') secondStation++;
    }
    if (interpolation + secondStation > 0) {
      result.push({
        start: period.start,
        end: period.end,
        days,
        interpolation,
        secondStation,
        summary: describeFills(days, interpolation, secondStation),
      });
    }
  }
  return result;
}

export function describeFills(days: number, interpolation: number, secondStation: number): string {
  const parts: string[] = [];
  if (interpolation > 0) parts.push(`${interpolation} of ${days} days filled by interpolation`);
  if (secondStation > 0) parts.push(`${secondStation} of ${days} days filled from a second station`);
  return parts.join(', ');
}
