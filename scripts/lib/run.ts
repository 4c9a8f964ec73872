import { spawn, type ChildProcess, type SpawnOptions } from 'node:child_process';

/** Run a command to completion, inheriting output; reject on a non-zero exit. */
export function run(command: string, args: string[], opts: SpawnOptions = {}): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { stdio: 'inherit', ...opts });
    child.on('error', reject);
    child.on('exit', (code, signal) =>
      code === 0 ? resolve() : reject(new Error(`${command} ${args.join(' ')} exited with ${code ?? signal}`)),
    );
  });
}

/** Wait until a URL answers (any status), or give up after the timeout. */
export async function waitForHttp(url: string, timeoutMs = 60_000, child?: ChildProcess): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (child && child.exitCode !== null) throw new Error(`process exited (${child.exitCode}) before ${url} answered`);
    try {
      await fetch(url, { signal: AbortSignal.timeout(2000) });
      return;
    } catch {
      await new Promise((r) => setTimeout(r, 250));
    }
  }
  throw new Error(`${url} did not answer within ${timeoutMs / 1000}s`);
}
