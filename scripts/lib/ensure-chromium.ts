import fs from 'node:fs';
import { execFileSync } from 'node:child_process';

/** Browser tests need Debian's Chromium; install it when missing and we are root. */
export function ensureChromium(executable = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium'): void {
  if (fs.existsSync(executable)) return;
  if (process.getuid?.() !== 0) {
    throw new Error(`Chromium is not at ${executable}. Install it (apt-get install -y chromium) or set CHROMIUM_PATH.`);
  }
  console.log('[partwise] installing Chromium from Debian for the browser tests…');
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
  if (!fs.existsSync(executable)) throw new Error(`Chromium still missing at ${executable} after installing.`);
}
