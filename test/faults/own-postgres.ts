/**
 * A PostgreSQL cluster of the test's own: initdb into a new temporary
 * folder, the server on a free loopback port, stopped and started at will,
 * removed at the end. Nothing touches the shared cluster on 5432. The
 * binaries are Debian's (/usr/lib/postgresql/<version>/bin); initdb and
 * postgres refuse to run as root, so under root they run as the `postgres`
 * OS user (runuser), in a folder that user owns.
 */
import { execFile } from 'node:child_process';
import { chownSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';
import { freePort } from '../support/ports.js';

const run = promisify(execFile);
const ROOT = '/usr/lib/postgresql';
const OS_USER = 'postgres';

/** The newest PostgreSQL bin folder with initdb, pg_ctl and postgres, or null. */
export function postgresBinaries(): string | null {
  if (!existsSync(ROOT)) return null;
  const versions = readdirSync(ROOT)
    .filter((v) => /^\d+$/.test(v))
    .sort((a, b) => Number(b) - Number(a));
  for (const version of versions) {
    const bin = join(ROOT, version, 'bin');
    if (['initdb', 'pg_ctl', 'postgres'].every((tool) => existsSync(join(bin, tool)))) return bin;
  }
  return null;
}

/** Why the cluster cannot be made here, or null when it can. */
export function ownClusterUnavailable(): string | null {
  if (process.platform !== 'linux') return 'not on Linux';
  if (postgresBinaries() === null)
    return `no PostgreSQL binaries under ${ROOT}/<version>/bin (Debian's postgresql package)`;
  if (process.getuid?.() === 0 && !existsSync('/usr/sbin/runuser') && !existsSync('/sbin/runuser'))
    return 'running as root without runuser to switch to the postgres user';
  return null;
}

export interface OwnCluster {
  port: number;
  /** A URL of the cluster's `postgres` database (trust authentication, loopback only). */
  url: string;
  start(): Promise<void>;
  /** pg_ctl stop: `fast` disconnects clients and shuts down cleanly; `immediate` is a crash (recovery at the next start). */
  stop(mode?: 'fast' | 'immediate'): Promise<void>;
  /** pg_terminate_backend on every client backend but the caller's: as a failover or an operator does. Returns how many were ended. */
  terminateBackends(): Promise<number>;
  /** Stop (immediately) and remove the folder. */
  dispose(): Promise<void>;
}

/** Run a binary of the cluster, as the postgres OS user when we are root. */
async function asOwner(bin: string, tool: string, args: string[]): Promise<void> {
  const path = join(bin, tool);
  const [command, argv] = process.getuid?.() === 0 ? ['runuser', ['-u', OS_USER, '--', path, ...args]] : [path, args];
  await run(command, argv, { timeout: 60_000 });
}

async function ownerIds(): Promise<{ uid: number; gid: number }> {
  const uid = Number((await run('id', ['-u', OS_USER])).stdout.trim());
  const gid = Number((await run('id', ['-g', OS_USER])).stdout.trim());
  return { uid, gid };
}

/** initdb and start a new cluster. */
export async function createOwnCluster(): Promise<OwnCluster> {
  const bin = postgresBinaries();
  if (bin === null) throw new Error('no PostgreSQL binaries');
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-own-pg-'));
  if (process.getuid?.() === 0) {
    const { uid, gid } = await ownerIds();
    chownSync(folder, uid, gid);
  }
  const data = join(folder, 'data');
  const port = await freePort();
  await asOwner(bin, 'initdb', ['-D', data, '-A', 'trust', '-U', 'postgres', '-E', 'UTF8', '--locale=C', '--no-sync']);
  // fsync off spares the disk: an immediate stop kills the server, not the machine, so the OS still holds every
  // write. synchronous_commit stays on: off, a commit is acknowledged before its WAL leaves the server's memory,
  // and an immediate stop loses acknowledged writes (this test caught exactly that when it was off).
  const options = `-p ${port} -k ${folder} -c listen_addresses=127.0.0.1 -c fsync=off -c full_page_writes=off -c max_connections=40`;
  const start = () =>
    asOwner(bin, 'pg_ctl', ['-D', data, '-o', options, '-l', join(folder, 'server.log'), '-w', '-t', '30', 'start']);
  const stop = (mode: 'fast' | 'immediate' = 'fast') =>
    asOwner(bin, 'pg_ctl', ['-D', data, '-m', mode, '-w', '-t', '30', 'stop']);
  await start();
  const url = `postgres://postgres@127.0.0.1:${port}/postgres`;
  let disposed = false;
  return {
    port,
    url,
    start,
    stop,
    async terminateBackends() {
      const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 2000 });
      client.on('error', () => {});
      try {
        await client.connect();
        const { rows } = await client.query<{ ended: boolean }>(
          "select pg_terminate_backend(pid) as ended from pg_stat_activity where pid <> pg_backend_pid() and backend_type = 'client backend'",
        );
        return rows.filter((r) => r.ended).length;
      } finally {
        await client.end().catch(() => {});
      }
    },
    async dispose() {
      if (disposed) return;
      disposed = true;
      await stop('immediate').catch(() => {});
      rmSync(folder, { recursive: true, force: true });
    },
  };
}
