/** Counts of what the fuzzer sent and got back, printed as one summary line for the record. */

export interface RouteFigures {
  route: string;
  runs: number;
  /** By status code. */
  statuses: Record<string, number>;
  /** By the first hostile part of the request (its body kind). */
  kinds: Record<string, number>;
  /** Answers that were not sent at all (the test client refused them). */
  unsendable: number;
  milliseconds: number;
}

export function newFigures(route: string): RouteFigures {
  return { route, runs: 0, statuses: {}, kinds: {}, unsendable: 0, milliseconds: 0 };
}

export function count(figures: RouteFigures, kind: string, status: number | null): void {
  figures.runs++;
  const bodyKind = kind.split('+')[0]!;
  figures.kinds[bodyKind] = (figures.kinds[bodyKind] ?? 0) + 1;
  if (status === null) figures.unsendable++;
  else figures.statuses[status] = (figures.statuses[status] ?? 0) + 1;
}

/** One line: seed, totals and per-route runs and status counts. */
export function summaryLine(seed: number, all: readonly RouteFigures[], extra: Record<string, unknown>): string {
  const total = all.reduce((n, f) => n + f.runs, 0);
  return `fuzz summary ${JSON.stringify({
    seed,
    requests: total,
    ...extra,
    routes: all.map((f) => ({
      route: f.route,
      runs: f.runs,
      ms: Math.round(f.milliseconds),
      statuses: f.statuses,
      unsendable: f.unsendable,
    })),
  })}`;
}
