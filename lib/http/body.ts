import { AppError } from '@/lib/errors';

/**
 * Request bodies read with a byte cap while they stream. `request.text()`,
 * `arrayBuffer()` and `formData()` buffer the whole body before anyone can look at
 * its size, and a chunked body has no Content-Length to refuse it by; here reading
 * stops at the first chunk past the cap and the stream is cancelled, so a client
 * cannot make the server hold more than the cap (plus one chunk).
 */

/** The declared Content-Length, or null when the request has none (chunked) or a malformed one. */
export function declaredLength(headers: { get(name: string): string | null }): number | null {
  const raw = headers.get('content-length');
  if (raw === null || !/^\s*\d+\s*$/.test(raw)) return null;
  return Number(raw);
}

/** Stop a body nobody will read (a refusal before reading); errors of an already closed stream are moot. */
export async function discardBody(body: ReadableStream<Uint8Array> | null | undefined): Promise<void> {
  if (!body || body.locked) return;
  try {
    await body.cancel();
  } catch {}
}

/**
 * All of a body's bytes, or `tooLarge()` thrown as soon as more than `maxBytes` arrived
 * (the stream is cancelled then: nothing more is read).
 */
export async function readBytesCapped(body: ReadableStream<Uint8Array> | null | undefined, maxBytes: number, tooLarge: () => AppError): Promise<Uint8Array> {
  if (!body) return new Uint8Array(0);
  const reader = body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > maxBytes) {
        chunks.length = 0;
        await reader.cancel().catch(() => {});
        throw tooLarge();
      }
      chunks.push(value);
    }
  } catch (error) {
    if (error instanceof AppError) throw error;
    // The client went away or sent a broken body: nothing of it is kept.
    throw new AppError('bad_request', 'The request body could not be read to the end.', { cause: error });
  } finally {
    reader.releaseLock();
  }
  if (chunks.length === 1) return chunks[0];
  const bytes = new Uint8Array(size);
  let at = 0;
  for (const chunk of chunks) {
    bytes.set(chunk, at);
    at += chunk.byteLength;
  }
  return bytes;
}

/** The body as UTF-8 text (malformed bytes become U+FFFD, as `request.text()` does), capped like readBytesCapped. */
export async function readTextCapped(body: ReadableStream<Uint8Array> | null | undefined, maxBytes: number, tooLarge: () => AppError): Promise<string> {
  return new TextDecoder().decode(await readBytesCapped(body, maxBytes, tooLarge));
}
