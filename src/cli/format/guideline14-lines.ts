/** The Guideline 14 acceptance check as report lines, shared by both reports. */
import type { Guideline14Check } from '../../engine/index.js';
import { formatPercent } from './numbers.js';

export function guideline14Lines(check: Guideline14Check | null, heading: string): string[] {
  if (!check) return [`${heading}: not available (the shape was not fitted)`];
  const verdict = (pass: boolean) => (pass ? 'pass' : 'FAIL');
  return [
    `${heading}: ${verdict(check.pass)}`,
    `  CV(RMSE)  ${formatPercent(check.cvrmse.value, 2)}  limit ${formatPercent(check.cvrmse.limit, 1)}  ${verdict(check.cvrmse.pass)}`,
    `  NMBE      ${formatPercent(check.nmbe.value, 4)}  limit ±${formatPercent(check.nmbe.limit, 4)}  ${verdict(check.nmbe.pass)}`,
    ...(check.outOfSample
      ? [
          `  out of sample (${check.outOfSample.method}): CV(RMSE) ${formatPercent(check.outOfSample.cvrmse, 2)}, NMBE ${formatPercent(check.outOfSample.nmbe, 4)}`,
        ]
      : []),
    ...(check.note ? [`  Note: ${check.note}`] : []),
    `  Limits: ${check.source}`,
  ];
}
