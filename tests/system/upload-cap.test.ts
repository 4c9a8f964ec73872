/**
 * Upload caps over real HTTP, on a server process of the test's own (the seeded demo
 * workspace is on the free Sketch plan: 2 MB per file). A chunked 300 MB upload (no
 * Content-Length) must be answered 413 naming the plan while the server's resident
 * memory stays within a small bound: the body is cut off at the cap, never buffered.
 * A memory bound, not a timing goal; RSS is read from /proc/PID/status. Signing in
 * (beforeAll) goes through the auth route's capped body reader.
 */
import fs from 'node:fs';
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

const MB = 1024 * 1024;
const CHUNK = 64 * 1024;
let app: AppProcess | undefined;
let cookie = '';

beforeAll(async () => {
  const { dir, env } = await prepareDatabase('upload-cap');
  app = await startApp(dir, env);
  cookie = await signIn(app.url);
});

afterAll(async () => {
  await app?.stop();
});

async function signIn(base: string): Promise<string> {
  const csrf = await fetch(`${base}/api/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const jar = (res: Response) => res.headers.getSetCookie().map((line) => line.split(';')[0]);
  const csrfCookies = jar(csrf);
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookies.join('; ') },
    body: new URLSearchParams({ csrfToken, email: DEMO_USERS.member.email, password: DEMO_USERS.member.password, json: 'true' }),
  });
  const session = jar(res).find((c) => c.includes('session-token'));
  if (!session) throw new Error(`sign-in failed: ${res.status}`);
  return session;
}

/** Resident memory of the server process, in bytes (VmRSS: now; VmHWM: the peak so far). */
function memoryOf(pid: number): { rss: number; peak: number } {
  const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (field: string) => Number(new RegExp(`^${field}:\\s+(\\d+) kB`, 'm').exec(status)![1]) * 1024;
  return { rss: kb('VmRSS'), peak: kb('VmHWM') };
}

interface Sent {
  status: number;
  body: string;
  /** Bytes the client had written when the answer came. */
  sent: number;
}

/**
 * POST `total` bytes in 64 KB chunks (chunked unless `contentLength` is declared),
 * with backpressure, stopping as soon as the server answers.
 */
function pushBody(path: string, total: number, headers: Record<string, string>, head = ''): Promise<Sent> {
  const url = new URL(path, app!.url);
  return new Promise((resolve, reject) => {
    let sent = 0;
    let answered = false;
    const req = http.request(url, { method: 'POST', headers: { cookie, origin: app!.url, ...headers } }, (res) => {
      answered = true;
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (c) => (body += c));
      res.on('end', () => {
        resolve({ status: res.statusCode!, body, sent });
        req.destroy();
      });
    });
    req.on('error', (e) => {
      if (!answered) reject(new Error(`no answer after ${sent} bytes: ${e.message}`));
    });
    const chunk = Buffer.alloc(CHUNK, '7');
    const pump = () => {
      if (head && sent === 0) {
        req.write(head);
        sent += Buffer.byteLength(head);
      }
      while (!answered && sent < total) {
        const ok = req.write(chunk);
        sent += chunk.length;
        if (!ok) return void req.once('drain', pump);
      }
      if (!answered) req.end();
    };
    pump();
  });
}

describe('upload caps over HTTP', () => {
  it('a chunked 300 MB upload gets a 413 naming the plan, and server memory grows by less than 100 MB', async () => {
    const pid = app!.child.pid!;
    // Warm the route (its code loaded, a dataset stored) so the figures below are the body's alone.
    const warm = await pushBody('/api/datasets?name=Warm-up', 0, { 'content-type': 'text/csv' }, ['a,b', ...Array.from({ length: 20 }, (_, i) => `${i},${i * 3}`)].join('\n'));
    expect(warm.status, warm.body).toBe(201);

    const before = memoryOf(pid);
    let highest = before.rss;
    const sampler = setInterval(() => {
      highest = Math.max(highest, memoryOf(pid).rss);
    }, 20);
    let answer: Sent;
    try {
      answer = await pushBody('/api/datasets', 300 * MB, { 'content-type': 'text/csv', 'transfer-encoding': 'chunked' });
    } finally {
      clearInterval(sampler);
    }
    const after = memoryOf(pid);
    highest = Math.max(highest, after.rss);

    expect(answer.status, answer.body).toBe(413);
    const error = JSON.parse(answer.body).error;
    expect(error.code).toBe('payload_too_large');
    expect(error.message).toMatch(/the Sketch plan accepts uploads up to 2 MB per file\. Upgrade to Bench/);
    const grewBy = highest - before.rss;
    const peakGrewBy = after.peak - before.peak;
    console.log(`[upload-cap] 300 MB chunked upload: answered after ${(answer.sent / MB).toFixed(1)} MB sent; RSS ${(before.rss / MB).toFixed(0)} → highest ${(highest / MB).toFixed(0)} MB (+${(grewBy / MB).toFixed(1)}); peak +${(peakGrewBy / MB).toFixed(1)} MB`);
    expect(grewBy).toBeLessThan(100 * MB);
    expect(peakGrewBy).toBeLessThan(100 * MB);
  });

  it('a declared 300 MB upload (as a browser sends a file) is answered 413 before the body is read', async () => {
    const answer = await pushBody('/api/datasets', 300 * MB, { 'content-type': 'text/csv', 'content-length': String(300 * MB) });
    expect(answer.status, answer.body).toBe(413);
    expect(JSON.parse(answer.body).error.message).toMatch(/^This upload is 300 MB; the Sketch plan accepts uploads up to 2 MB per file\. No plan allows that much: Lab, the largest/);
  });

  it('a chunked multipart upload past the cap is refused the same way', async () => {
    const boundary = 'partwise-system-boundary';
    const head = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\na,b\r\n`;
    const answer = await pushBody('/api/datasets', 50 * MB, { 'content-type': `multipart/form-data; boundary=${boundary}`, 'transfer-encoding': 'chunked' }, head);
    expect(answer.status, answer.body).toBe(413);
    expect(JSON.parse(answer.body).error.message).toMatch(/Sketch plan accepts uploads up to 2 MB/);
  });

  it('a chunked 50 MB body to a JSON route is cut off at 64 KB', async () => {
    const answer = await pushBody('/api/embeds', 50 * MB, { 'content-type': 'application/json', 'transfer-encoding': 'chunked' }, '{"title":"');
    expect(answer.status, answer.body).toBe(413);
    expect(JSON.parse(answer.body).error.message).toBe('The body is larger than 65536 bytes.');
  });

  it('the public sign-in form is cut off at 16 KB (next-auth would read any body whole)', async () => {
    const answer = await pushBody('/api/auth/callback/credentials', 50 * MB, { 'content-type': 'application/x-www-form-urlencoded', 'transfer-encoding': 'chunked' }, 'email=');
    expect(answer.status, answer.body).toBe(413);
    expect(JSON.parse(answer.body).error.message).toBe('The body is larger than 16384 bytes.');
  });

  it('the server keeps answering afterwards', async () => {
    const res = await fetch(`${app!.url}/api/datasets`, { headers: { cookie } });
    expect(res.status).toBe(200);
    const names = ((await res.json()) as { datasets: { name: string }[] }).datasets.map((d) => d.name);
    expect(names).toContain('Warm-up');
  });
});
