/**
 * A process's identity as a holder of work in flight: `host/pid/start`, the
 * host name, the process id and the process's start time (ISO-8601). Another
 * process on the same host can tell whether the holder is gone: no process
 * has that id, or the one that has it started after the holder did (the id
 * was reused, as a restarted container's process 1 reuses it). A holder on
 * another host is never judged gone: nothing here can see it.
 */
import { readFileSync } from 'node:fs';
import { hostname } from 'node:os';

/** The parts of a holder text. */
export interface Holder {
  host: string;
  pid: number;
  /** Start time, milliseconds since the epoch. */
  startedAt: number;
}

/** Slack for comparing two readings of one start time (the clock and the kernel's tick differ a little). */
const START_SLACK_MS = 5_000;

const STARTED_AT = Date.now() - Math.round(process.uptime() * 1000);

/** This process as a holder. */
export function thisHolder(): string {
  return formatHolder({ host: hostname(), pid: process.pid, startedAt: STARTED_AT });
}

export function formatHolder(holder: Holder): string {
  return `${holder.host}/${holder.pid}/${new Date(holder.startedAt).toISOString()}`;
}

/** The parts of a holder text, or null when it is not one. */
export function parseHolder(text: string): Holder | null {
  const match = /^([^/]+)\/(\d{1,10})\/(\S+)$/.exec(text);
  if (!match) return null;
  const startedAt = Date.parse(match[3]!);
  return Number.isFinite(startedAt) ? { host: match[1]!, pid: Number(match[2]), startedAt } : null;
}

/** When the process with this id started (Linux /proc), or null when that cannot be read. */
function processStartedAt(pid: number): number | null {
  try {
    // Field 22 of /proc/PID/stat is the start in clock ticks after boot; the command name (field 2) may hold spaces.
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    const ticks = Number(fields[19]);
    const bootLine = /^btime (\d+)$/m.exec(readFileSync('/proc/stat', 'utf8'));
    if (!bootLine || !Number.isFinite(ticks)) return null;
    // 100 ticks a second: USER_HZ on every Linux build Node.js supports (common practice).
    return Number(bootLine[1]) * 1000 + ticks * 10;
  } catch {
    return null;
  }
}

function processExists(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    // EPERM: it exists but belongs to someone else.
    return (error as NodeJS.ErrnoException).code !== 'ESRCH';
  }
}

/**
 * True only when the holder is certainly gone: it ran on this host and no
 * process with its id is running, or the one running started after it (or
 * is this process under a different start). Unknown (another host, an
 * unreadable holder) is false.
 */
export function holderIsGone(text: string): boolean {
  const holder = parseHolder(text);
  if (!holder || holder.host !== hostname()) return false;
  if (holder.pid === process.pid) return Math.abs(holder.startedAt - STARTED_AT) > START_SLACK_MS;
  if (!processExists(holder.pid)) return true;
  const started = processStartedAt(holder.pid);
  return started !== null && started > holder.startedAt + START_SLACK_MS;
}
