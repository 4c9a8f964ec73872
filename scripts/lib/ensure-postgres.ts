import fs from 'node:fs';
import path from 'node:path';
import { execFileSync, spawnSync, type SpawnSyncOptions } from 'node:child_process';

/**
 * A throwaway PostgreSQL for the tests: Debian's `postgresql` (15) binaries, installed
 * with apt-get when missing and we are root (like ensure-chromium.ts does for Chromium),
 * a fresh cluster in `.tmp/pg-<port>` on a port of its own (loopback and a socket in the
 * data directory only, trust authentication, no fsync: it holds nothing worth keeping),
 * stopped by `stop()`.
 *
 * initdb and the server refuse to run as root, so as root they run as the `postgres`
 * system user that the Debian package creates (the data directory is chowned to it).
 */
export const PG_VERSION = '15';
export const PG_USER = 'partwise';

export interface RunningPostgres {
  port: number;
  dataDir: string;
  /** postgres://partwise@127.0.0.1:PORT/DATABASE (no password: trust on loopback). */
  url(database: string): string;
  stop(): void;
}

export function postgresBinDir(): string {
  return process.env.PG_BIN_DIR ?? `/usr/lib/postgresql/${PG_VERSION}/bin`;
}

/** The Debian package's binaries, installed when missing and we are root. */
export function ensurePostgresBinaries(bin = postgresBinDir()): string {
  if (fs.existsSync(path.join(bin, 'pg_ctl'))) return bin;
  if (process.getuid?.() !== 0) {
    throw new Error(`PostgreSQL ${PG_VERSION} is not at ${bin}. Install it (apt-get install -y postgresql) or set PG_BIN_DIR.`);
  }
  console.log(`[partwise] installing PostgreSQL ${PG_VERSION} from Debian for the tests on PostgreSQL…`);
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'postgresql'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
  if (!fs.existsSync(path.join(bin, 'pg_ctl'))) throw new Error(`PostgreSQL still missing at ${bin} after installing.`);
  return bin;
}

/** uid/gid to run the server as: ourselves, or the `postgres` user when we are root. */
function serverUser(): { uid?: number; gid?: number } {
  if (process.getuid?.() !== 0) return {};
  const id = (flag: string) => Number(execFileSync('id', [flag, 'postgres'], { encoding: 'utf8' }).trim());
  try {
    return { uid: id('-u'), gid: id('-g') };
  } catch {
    throw new Error('Running as root and there is no `postgres` user to run PostgreSQL as (the Debian postgresql package creates it).');
  }
}

function runAs(user: { uid?: number; gid?: number }, command: string, args: string[], options: SpawnSyncOptions = {}): string {
  const r = spawnSync(command, args, { ...options, ...user, encoding: 'utf8', env: { ...process.env, LC_ALL: 'C.UTF-8', ...options.env } });
  if (r.status !== 0) {
    throw new Error(`${path.basename(command)} failed (${r.error?.message ?? `exit ${r.status}`}): ${String(r.stderr ?? '').trim().slice(-2000)}`);
  }
  return String(r.stdout ?? '');
}

/** The test port's own PostgreSQL port, so parallel test stacks do not meet. */
export function testPostgresPort(appPort = process.env.PARTWISE_TEST_PORT ?? '3210'): number {
  return Number(process.env.PARTWISE_TEST_PG_PORT ?? 50_000 + (Number(appPort) % 10_000));
}

export function startPostgres(port = testPostgresPort(), root = path.resolve('.tmp')): RunningPostgres {
  const bin = ensurePostgresBinaries();
  const user = serverUser();
  const dataDir = path.join(root, `pg-${port}`);
  const pgCtl = path.join(bin, 'pg_ctl');
  // A cluster left running by an interrupted run is stopped before its folder goes.
  if (fs.existsSync(path.join(dataDir, 'postmaster.pid'))) {
    spawnSync(pgCtl, ['stop', '-D', dataDir, '-m', 'immediate', '-w'], { ...user, stdio: 'ignore' });
  }
  fs.rmSync(dataDir, { recursive: true, force: true });
  // The folders above must stay open to the server's user: only the data directory is 0700.
  fs.mkdirSync(root, { recursive: true });
  fs.mkdirSync(dataDir, { mode: 0o700 });
  if (user.uid !== undefined) fs.chownSync(dataDir, user.uid, user.gid!);

  runAs(user, path.join(bin, 'initdb'), ['-D', dataDir, '-U', PG_USER, '-A', 'trust', '-E', 'UTF8', '--locale=C.UTF-8', '--no-sync']);
  const settings = [
    `-p ${port}`,
    "-c listen_addresses='127.0.0.1'",
    `-c unix_socket_directories='${dataDir}'`,
    '-c fsync=off',
    '-c synchronous_commit=off',
    '-c full_page_writes=off',
    '-c max_connections=200',
  ].join(' ');
  runAs(user, pgCtl, ['start', '-D', dataDir, '-l', path.join(dataDir, 'server.log'), '-w', '-t', '60', '-o', settings], { stdio: ['ignore', 'pipe', 'pipe'] });

  return {
    port,
    dataDir,
    url: (database) => `postgres://${PG_USER}@127.0.0.1:${port}/${database}`,
    stop() {
      spawnSync(pgCtl, ['stop', '-D', dataDir, '-m', 'fast', '-w'], { ...user, stdio: 'ignore' });
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
