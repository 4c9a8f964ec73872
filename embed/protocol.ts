/**
 * Messages between the calculator iframe and the loader on the host page. Both sides
 * check the sender's origin and the exact shape before acting on a message.
 */
export const MESSAGE_SOURCE = 'partwise-calculator';

/** iframe → host: the calculator's content height in CSS pixels. */
export interface SizeMessage {
  source: typeof MESSAGE_SOURCE;
  type: 'size';
  token: string;
  height: number;
}

/**
 * iframe → host: "the calculator is up" (sent once it has started, and again on each
 * hello). A frame the browser refused to show (the host is not on the allowed list, or
 * the address is unknown) never sends it, so the loader can replace the broken frame.
 */
export interface ReadyMessage {
  source: typeof MESSAGE_SOURCE;
  type: 'ready';
  token: string;
}

/** host → iframe: "tell me your size" (sent when the iframe has loaded). */
export interface HelloMessage {
  source: typeof MESSAGE_SOURCE;
  type: 'hello';
}

export const MAX_FRAME_HEIGHT = 4000;

/** How long after the iframe's load event the loader waits for a sign of life before it shows its own notice. */
export const READY_TIMEOUT_MS = 4000;
export const TOKEN_PATTERN = /^[A-Za-z0-9_-]{21,64}$/;

export function isSizeMessage(data: unknown): data is SizeMessage {
  if (!data || typeof data !== 'object') return false;
  const m = data as Record<string, unknown>;
  return (
    m.source === MESSAGE_SOURCE &&
    m.type === 'size' &&
    typeof m.token === 'string' &&
    TOKEN_PATTERN.test(m.token) &&
    typeof m.height === 'number' &&
    Number.isFinite(m.height) &&
    m.height >= 0 &&
    m.height <= MAX_FRAME_HEIGHT * 4 &&
    Object.keys(m).length === 4
  );
}

export function isHelloMessage(data: unknown): data is HelloMessage {
  if (!data || typeof data !== 'object') return false;
  const m = data as Record<string, unknown>;
  return m.source === MESSAGE_SOURCE && m.type === 'hello' && Object.keys(m).length === 2;
}

export function isReadyMessage(data: unknown): data is ReadyMessage {
  if (!data || typeof data !== 'object') return false;
  const m = data as Record<string, unknown>;
  return m.source === MESSAGE_SOURCE && m.type === 'ready' && typeof m.token === 'string' && TOKEN_PATTERN.test(m.token) && Object.keys(m).length === 3;
}
