/**
 * A holder of work in flight (src/lib/process-holder.ts) is judged gone only
 * when that is certain: a process of this host that no longer runs, or whose
 * id now belongs to a process started later. Check values: synthetic (the
 * test makes the processes and so sets the truth).
 */
import { spawnSync } from 'node:child_process';
import { hostname } from 'node:os';
import { describe, expect, it } from 'vitest';
import { formatHolder, holderIsGone, parseHolder, thisHolder } from '../../src/lib/process-holder.js';

/** The id of a process that has run and exited. */
function deadPid(): number {
  const finished = spawnSync(process.execPath, ['-e', ''], { stdio: 'ignore' });
  return finished.pid!;
}

describe('holderIsGone', () => {
  it('reads back what it writes', () => {
    const holder = { host: 'builder-7', pid: 4321, startedAt: Date.parse('2026-05-06T07:08:09.010Z') };
    expect(parseHolder(formatHolder(holder))).toEqual(holder);
    expect(parseHolder('not a holder')).toBeNull();
  });

  it('says this process is not gone', () => {
    expect(holderIsGone(thisHolder())).toBe(false);
  });

  it('says a process of this host that has exited is gone', () => {
    expect(holderIsGone(formatHolder({ host: hostname(), pid: deadPid(), startedAt: Date.now() - 1_000 }))).toBe(true);
  });

  it('says this process id under another start (a restarted process 1) is gone', () => {
    expect(holderIsGone(formatHolder({ host: hostname(), pid: process.pid, startedAt: Date.now() - 3_600_000 }))).toBe(
      true,
    );
  });

  it('says a running process that started after the holder did (a reused id) is gone, and one started before is not', () => {
    const started = Date.now() - Math.round(process.uptime() * 1000);
    expect(holderIsGone(formatHolder({ host: hostname(), pid: process.ppid, startedAt: Date.now() }))).toBe(false);
    // The parent started before this process did, so a holder claiming a start long before that is an older process.
    expect(
      holderIsGone(formatHolder({ host: hostname(), pid: process.ppid, startedAt: started - 10 * 365 * 86_400_000 })),
    ).toBe(true);
  });

  it('never judges a holder on another host, or an unreadable one', () => {
    expect(holderIsGone(formatHolder({ host: 'another-host', pid: deadPid(), startedAt: Date.now() }))).toBe(false);
    expect(holderIsGone('garbage')).toBe(false);
  });
});
