/**
 * Bodies are capped while they stream: an upload past the plan's size (chunked, with no
 * Content-Length) is cut off at the first chunk past the cap, the stream is cancelled,
 * and the answer is a 413 that names the plan, its limit and the plan that would take
 * the file; a declared size over the cap is refused before anything is read. JSON
 * routes (readJson), the scoring route and the payment webhook stream with their caps too.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { Dataset, Subscription, Workspace } from '@/models';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { POST as inviteRoute } from '@/app/api/team/invitations/route';
import { POST as scoreRoute } from '@/app/api/score/[token]/route';
import { POST as webhookRoute } from '@/app/api/webhooks/payments/route';
import { POST as authRoute } from '@/app/api/auth/[...nextauth]/route';
import { assertRowsAllowed } from '@/lib/billing/limits';
import { MAX_SCORE_BODY_BYTES } from '@/lib/scoring';
import { MULTIPART_ALLOWANCE_BYTES } from '@/lib/datasets/upload';
import { PLANS } from '@/lib/plans';
import { makeRequest, sessionCookie } from '../../helpers/auth';
import { modelWorkspace } from '../embeds/fixtures';

// The auth route's cap (a route file may export only handlers).
const MAX_AUTH_BODY_BYTES = 16 * 1024;
const CHUNK = 64 * 1024;
const MB = 1024 * 1024;
const noParams = { params: Promise.resolve({}) };

/**
 * A body that would produce `total` bytes, made one chunk at a time only when the reader
 * asks (no read-ahead), so `produced` is exactly what the server read.
 */
function endlessBody(total: number, opts: { head?: Uint8Array; fill?: number } = {}) {
  const state = { produced: 0, cancelled: false };
  let head = opts.head;
  const stream = new ReadableStream<Uint8Array>(
    {
      pull(controller) {
        if (head) {
          state.produced += head.length;
          controller.enqueue(head);
          head = undefined;
          return;
        }
        if (state.produced >= total) return controller.close();
        const chunk = new Uint8Array(Math.min(CHUNK, total - state.produced)).fill(opts.fill ?? 0x31);
        state.produced += chunk.length;
        controller.enqueue(chunk);
      },
      cancel() {
        state.cancelled = true;
      },
    },
    { highWaterMark: 0 },
  );
  return { stream, state };
}

async function streamingRequest(path: string, body: ReadableStream<Uint8Array>, opts: { userId?: number; workspaceId?: number; headers?: Record<string, string> } = {}): Promise<Request> {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (opts.userId) headers.cookie = await sessionCookie(opts.userId, opts.workspaceId);
  return new Request(new URL(path, 'http://localhost:3000'), { method: 'POST', headers, body, duplex: 'half' } as RequestInit);
}

let w: Awaited<ReturnType<typeof modelWorkspace>>;
const sketchCap = PLANS.sketch.limits.uploadBytes;
beforeAll(async () => {
  w = await modelWorkspace({ plan: 'sketch' });
});

async function upload(body: ReadableStream<Uint8Array>, headers: Record<string, string>) {
  const res = await uploadRoute(await streamingRequest('/api/datasets', body, { userId: w.member.id, workspaceId: w.workspace.id, headers }), noParams);
  return { status: res.status, json: (await res.json()) as { error?: { code: string; message: string }; dataset?: { id: number; rowCount: number } } };
}

describe('dataset upload, streamed with the plan cap', () => {
  it('a chunked 50 MB CSV body stops at the Sketch cap: 413 naming the plan, the limit and Bench', async () => {
    const before = await Dataset.count();
    const { stream, state } = endlessBody(50 * MB);
    const res = await upload(stream, { 'content-type': 'text/csv' });
    expect(res.status).toBe(413);
    expect(res.json.error!.code).toBe('payload_too_large');
    expect(res.json.error!.message).toBe('This upload is over 2 MB; the Sketch plan accepts uploads up to 2 MB per file. Upgrade to Bench on the billing page: it accepts uploads up to 20 MB.');
    expect(state.cancelled).toBe(true);
    expect(state.produced).toBeLessThanOrEqual(sketchCap + CHUNK);
    expect(await Dataset.count()).toBe(before);
  });

  it('a chunked multipart upload is capped the same way (framing allowance only)', async () => {
    const boundary = '----partwise-test-boundary';
    const head = new TextEncoder().encode(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\na,b\r\n`);
    const { stream, state } = endlessBody(50 * MB, { head });
    const res = await upload(stream, { 'content-type': `multipart/form-data; boundary=${boundary}` });
    expect(res.status).toBe(413);
    expect(res.json.error!.message).toMatch(/Sketch plan accepts uploads up to 2 MB per file/);
    expect(state.cancelled).toBe(true);
    expect(state.produced).toBeLessThanOrEqual(sketchCap + MULTIPART_ALLOWANCE_BYTES + CHUNK);
  });

  it('a multipart upload as a browser frames it (mixed-case boundary) is read and stored', async () => {
    const boundary = '----WebKitFormBoundaryQx7TzK2mLp9Ra';
    const csv = ['speed,distance', ...Array.from({ length: 15 }, (_, i) => `${20 + i},${100 + 3 * i}`)].join('\r\n');
    const body = [`--${boundary}`, 'Content-Disposition: form-data; name="name"', '', 'Browser framed', `--${boundary}`, 'Content-Disposition: form-data; name="file"; filename="club.csv"', 'Content-Type: text/csv', '', csv, `--${boundary}--`, ''].join('\r\n');
    const bytes = new TextEncoder().encode(body);
    const stream = new ReadableStream<Uint8Array>({
      start(controller) {
        controller.enqueue(bytes.slice(0, 40));
        controller.enqueue(bytes.slice(40));
        controller.close();
      },
    });
    const res = await upload(stream, { 'content-type': `multipart/form-data; boundary=${boundary}` });
    expect(res.status, JSON.stringify(res.json)).toBe(201);
    expect(res.json.dataset!.rowCount).toBe(15);
    const stored = await Dataset.findByPk(res.json.dataset!.id);
    expect(stored!.name).toBe('Browser framed');
    expect(Buffer.from(stored!.originalCsv).toString('utf8')).toBe(csv);
  });

  it('a file just over the plan size inside the framing allowance is refused by its own size', async () => {
    const form = new FormData();
    form.set('file', new Blob([new Uint8Array(sketchCap + 10).fill(0x31)], { type: 'text/csv' }), 'edge.csv');
    const req = await makeRequest('/api/datasets', { method: 'POST', userId: w.member.id, workspaceId: w.workspace.id, body: form });
    const res = await uploadRoute(req, noParams);
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toMatch(/^This upload is 2\.0 MB; the Sketch plan accepts uploads up to 2 MB per file\./);
  });

  it('a declared Content-Length over the cap is refused before anything is read, naming a plan that takes it', async () => {
    const { stream, state } = endlessBody(30 * MB);
    const res = await upload(stream, { 'content-type': 'text/csv', 'content-length': String(30 * MB) });
    expect(res.status).toBe(413);
    expect(res.json.error!.message).toBe('This upload is 30 MB; the Sketch plan accepts uploads up to 2 MB per file. Upgrade to Lab on the billing page: it accepts uploads up to 60 MB.');
    expect(state.produced).toBe(0);
    expect(state.cancelled).toBe(true);
  });

  it('a size no plan accepts says so and names the largest plan, not the free one', async () => {
    const { stream } = endlessBody(300 * MB);
    const res = await upload(stream, { 'content-type': 'text/csv', 'content-length': String(300 * MB) });
    expect(res.status).toBe(413);
    expect(res.json.error!.message).toBe('This upload is 300 MB; the Sketch plan accepts uploads up to 2 MB per file. No plan allows that much: Lab, the largest, accepts uploads up to 60 MB. Contact Partwise support for more.');
  });

  it('a chunked body within the cap streams in and is stored whole', async () => {
    // Close to the plan's size: rows padded with a text column (fewer rows than the plan's 2,000).
    const lines = ['speed,distance,note'];
    let size = lines[0].length + 1;
    for (let i = 0; ; i++) {
      const row = `${20 + (i % 15)},${100 + i},${'r'.repeat(1500)}`;
      if (size + row.length + 1 > sketchCap) break;
      lines.push(row);
      size += row.length + 1;
    }
    const bytes = new TextEncoder().encode(lines.join('\n') + '\n');
    expect(bytes.length).toBeLessThanOrEqual(sketchCap);
    expect(bytes.length).toBeGreaterThan(sketchCap - 2000);
    const stream = new ReadableStream<Uint8Array>({
      start(controller) {
        for (let at = 0; at < bytes.length; at += CHUNK) controller.enqueue(bytes.slice(at, at + CHUNK));
        controller.close();
      },
    });
    const res = await upload(stream, { 'content-type': 'text/csv' });
    expect(res.status).toBe(201);
    expect(res.json.dataset!.rowCount).toBe(lines.length - 1);
    const stored = await Dataset.findByPk(res.json.dataset!.id);
    expect(Buffer.from(stored!.originalCsv).equals(Buffer.from(bytes))).toBe(true);
  });
});

describe('plan refusals name the real plan', () => {
  it('rows past every plan on the free plan: names Sketch and the largest plan, never calls Sketch the largest', async () => {
    const error = await assertRowsAllowed(w.workspace.id, 300_000, 1000).then(
      () => null,
      (e) => e,
    );
    expect(error.status).toBe(402);
    expect(error.message).toBe('This table has 300,000 rows; the Sketch plan accepts up to 2,000 rows per dataset. No plan allows that much: Lab, the largest, accepts up to 250,000 rows. Contact Partwise support for more.');
  });

  it('a file past every plan, checked after reading (402 path), names Lab as the largest', async () => {
    const error = await assertRowsAllowed(w.workspace.id, 10, 300 * MB).catch((e) => e);
    expect(error.message).toMatch(/^This file is 300 MB; the Sketch plan accepts uploads up to 2 MB\. No plan allows that much: Lab, the largest, accepts uploads up to 60 MB\./);
  });

  it('on the largest plan the refusal says so by name', async () => {
    const lab = await Workspace.create({ name: 'Lab ws', slug: `lab-${Date.now()}` });
    await Subscription.create({ workspaceId: lab.id, plan: 'lab', status: 'active' });
    const error = await assertRowsAllowed(lab.id, 300_000, 1000).catch((e) => e);
    expect(error.message).toMatch(/the Lab plan accepts up to 250,000 rows per dataset\. Lab is the largest plan; contact Partwise support for more\./);
  });
});

describe('JSON bodies stream with their cap', () => {
  it('readJson: a chunked 10 MB body to a JSON route is cut off past 64 KB (413)', async () => {
    const head = new TextEncoder().encode('{"email":"');
    const { stream, state } = endlessBody(10 * MB, { head, fill: 0x61 });
    const req = await streamingRequest('/api/team/invitations', stream, { userId: w.owner.id, workspaceId: w.workspace.id, headers: { 'content-type': 'application/json' } });
    const res = await inviteRoute(req, noParams);
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toBe('The body is larger than 65536 bytes.');
    expect(state.cancelled).toBe(true);
    expect(state.produced).toBeLessThanOrEqual(64 * 1024 + CHUNK);
  });

  it('the scoring route: a chunked body is cut off past its 4 KB cap', async () => {
    const published = await (await publishRoute(await makeRequest('/api/embeds', { userId: w.owner.id, workspaceId: w.workspace.id, json: { mixtureModelId: w.model.id } }), noParams)).json();
    const token = published.embed.token as string;
    const head = new TextEncoder().encode('{"values":{"pad":"');
    const { stream, state } = endlessBody(10 * MB, { head, fill: 0x61 });
    const res = await scoreRoute(await streamingRequest(`/api/score/${token}`, stream, { headers: { 'content-type': 'application/json' } }), { params: Promise.resolve({ token }) });
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toBe(`The body is larger than ${MAX_SCORE_BODY_BYTES} bytes.`);
    expect(state.cancelled).toBe(true);
    expect(state.produced).toBeLessThanOrEqual(MAX_SCORE_BODY_BYTES + CHUNK);
  });

  it('the payment webhook: a chunked body is cut off past 512 KB', async () => {
    const { stream, state } = endlessBody(20 * MB, { fill: 0x61 });
    const res = await webhookRoute(await streamingRequest('/api/webhooks/payments', stream, { headers: { 'content-type': 'application/json', 'stripe-signature': 't=1,v1=00' } }), noParams);
    expect(res.status).toBe(413);
    expect(state.cancelled).toBe(true);
    expect(state.produced).toBeLessThanOrEqual(512 * 1024 + CHUNK);
  });

  it('the sign-in form (next-auth, public): a chunked body is cut off past 16 KB before next-auth reads it', async () => {
    const { stream, state } = endlessBody(20 * MB, { head: new TextEncoder().encode('email='), fill: 0x61 });
    const req = await streamingRequest('/api/auth/callback/credentials', stream, { headers: { 'content-type': 'application/x-www-form-urlencoded' } });
    const res = await authRoute(req as never, { params: Promise.resolve({ nextauth: ['callback', 'credentials'] }) });
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toBe(`The body is larger than ${MAX_AUTH_BODY_BYTES} bytes.`);
    expect(state.cancelled).toBe(true);
    expect(state.produced).toBeLessThanOrEqual(MAX_AUTH_BODY_BYTES + CHUNK);
  });
});
