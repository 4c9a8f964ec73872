import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import type { ChildProcess } from 'node:child_process';
import { QueryTypes } from 'sequelize';
import { openSequelize } from '@/models/db';
import { spawnAppServer } from '../../scripts/lib/app-process';
import { run, waitForHttp } from '../../scripts/lib/run';

/**
 * A whole app server of a test's own: its own SQLite file (migrated and seeded with the
 * demo scenario by the project's scripts), its own port, the build the test stack uses.
 * For tests that kill, restart or reconfigure the server, which the shared stack must not see.
 */
export interface AppProcess {
  url: string;
  dir: string;
  databasePath: string;
  env: NodeJS.ProcessEnv;
  child: ChildProcess;
  log(): string;
  /** Send a signal and wait for the process to end; resolves with its exit code (null when killed). */
  stop(signal?: NodeJS.Signals): Promise<number | null>;
  /** Start the server again on the same database and port. */
  restart(): Promise<AppProcess>;
}

/** Random per test process: the servers run as deployments, which refuse secrets published in the source. */
export const SYSTEM_SECRET = randomBytes(32).toString('base64url');

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

/** Migrate and seed a fresh database under .tmp/system-NAME; returns the environment to serve it with. */
export async function prepareDatabase(name: string, extraEnv: Record<string, string> = {}): Promise<{ dir: string; env: NodeJS.ProcessEnv }> {
  const dir = path.resolve(`.tmp/system-${name}-${process.pid}`);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  const env: NodeJS.ProcessEnv = Object.assign({}, process.env, {
    NODE_ENV: 'production',
    DATABASE_URL: path.join(dir, 'partwise.sqlite'),
    PARTWISE_DATA_DIR: dir,
    NEXTAUTH_SECRET: SYSTEM_SECRET,
  }, extraEnv);
  // The shared stack's public URL must not leak in: each app is its own origin unless told otherwise.
  if (!extraEnv.NEXTAUTH_URL) delete env.NEXTAUTH_URL;
  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  await run('npx', ['tsx', 'scripts/seed.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  return { dir, env };
}

/** `host` is the address to bind (a deployment binds 0.0.0.0); the test still reaches it on 127.0.0.1. */
export async function startApp(dir: string, env: NodeJS.ProcessEnv, port?: number, host = '127.0.0.1'): Promise<AppProcess> {
  const p = port ?? (await freePort());
  const url = `http://127.0.0.1:${p}`;
  const fullEnv: NodeJS.ProcessEnv = { NEXTAUTH_URL: url, ...env, PORT: String(p) };
  const logFile = path.join(dir, 'server.log');
  const out = fs.openSync(logFile, 'a');
  const child = spawnAppServer({ port: p, host, env: fullEnv, stdio: ['ignore', out, out], detached: true });
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  const app: AppProcess = {
    url,
    dir,
    databasePath: String(fullEnv.DATABASE_URL),
    env: fullEnv,
    child,
    log: () => fs.readFileSync(logFile, 'utf8'),
    async stop(signal = 'SIGTERM') {
      if (child.exitCode === null && child.signalCode === null) {
        try {
          process.kill(-child.pid!, signal);
        } catch {}
      }
      return exited;
    },
    restart: () => startApp(dir, env, p, host),
  };
  try {
    await waitForHttp(`${url}/api/health`, 90_000, child);
  } catch (e) {
    await app.stop('SIGKILL');
    throw new Error(`${(e as Error).message}\n--- server log ---\n${app.log().slice(-3000)}`);
  }
  return app;
}

/** Read (or change) a test server's own database file from the test, on a connection of its own. */
export async function queryApp<T extends object>(app: Pick<AppProcess, 'databasePath'>, sql: string): Promise<T[]> {
  const db = openSequelize(app.databasePath);
  try {
    return await db.query<T>(sql, { type: QueryTypes.SELECT });
  } finally {
    await db.close();
  }
}
