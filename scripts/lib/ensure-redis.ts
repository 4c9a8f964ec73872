import fs from 'node:fs';
import path from 'node:path';
import { execFileSync, spawn, spawnSync } from 'node:child_process';

/**
 * A throwaway Redis for the tests: Debian's `redis-server`, installed with apt-get when
 * missing and we are root (like ensure-chromium.ts), started on a port of its own
 * (loopback only, no persistence: no RDB snapshots, no append-only file), stopped by `stop()`.
 */
export interface RunningRedis {
  port: number;
  url: string;
  stop(): void;
}

export function redisServerPath(): string {
  return process.env.REDIS_SERVER_PATH ?? '/usr/bin/redis-server';
}

export function ensureRedisServer(executable = redisServerPath()): string {
  if (fs.existsSync(executable)) return executable;
  if (process.getuid?.() !== 0) {
    throw new Error(`redis-server is not at ${executable}. Install it (apt-get install -y redis-server) or set REDIS_SERVER_PATH.`);
  }
  console.log('[partwise] installing redis-server from Debian for the tests…');
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'redis-server'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
  if (!fs.existsSync(executable)) throw new Error(`redis-server still missing at ${executable} after installing.`);
  return executable;
}

/** The test port's own Redis port, so parallel test stacks do not meet. */
export function testRedisPort(appPort = process.env.PARTWISE_TEST_PORT ?? '3210'): number {
  return Number(process.env.PARTWISE_TEST_REDIS_PORT ?? 56_379 + (Number(appPort) % 1000));
}

/** Start redis-server and wait until it answers PING (throws when it does not within 15 s). */
export async function startRedis(port = testRedisPort(), root = path.resolve('.tmp')): Promise<RunningRedis> {
  const exe = ensureRedisServer();
  const dir = path.join(root, `redis-${port}`);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  const log = fs.openSync(path.join(dir, 'server.log'), 'a');
  const child = spawn(exe, ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir, '--daemonize', 'no', '--protected-mode', 'yes'], {
    stdio: ['ignore', log, log],
  });
  let exited: number | null = null;
  child.on('exit', (code) => (exited = code ?? 1));
  const cli = path.join(path.dirname(exe), 'redis-cli');
  const deadline = Date.now() + 15_000;
  for (;;) {
    if (exited !== null) throw new Error(`redis-server exited (${exited}) at start: ${fs.readFileSync(path.join(dir, 'server.log'), 'utf8').slice(-1500)}`);
    const ping = fs.existsSync(cli) ? spawnSync(cli, ['-p', String(port), 'ping'], { encoding: 'utf8' }) : null;
    if (ping?.stdout?.trim() === 'PONG') break;
    if (!ping && (await tcpOpen(port))) break;
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`redis-server on port ${port} did not answer within 15 s`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    port,
    url: `redis://127.0.0.1:${port}`,
    stop() {
      child.kill('SIGTERM');
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

async function tcpOpen(port: number): Promise<boolean> {
  const net = await import('node:net');
  return new Promise((resolve) => {
    const s = net.connect(port, '127.0.0.1');
    s.once('connect', () => (s.end(), resolve(true)));
    s.once('error', () => resolve(false));
  });
}
