import { spawn, type ChildProcess, type SpawnOptions } from 'node:child_process';

/**
 * Start the app server (scripts/serve.ts) as one node process with tsx's loader, so a
 * signal sent to it reaches the server itself (no npx or tsx wrapper in between).
 */
export function spawnAppServer(opts: { port: number | string; host?: string; dev?: boolean } & SpawnOptions): ChildProcess {
  const { port, host = '127.0.0.1', dev = false, ...spawnOptions } = opts;
  const args = ['--import', 'tsx', 'scripts/serve.ts', '-p', String(port), '-H', host, ...(dev ? ['--dev'] : [])];
  return spawn(process.execPath, args, spawnOptions);
}
