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

/** host → iframe: "tell me your size" (sent when the iframe has loaded). */
export interface HelloMessage {
  source: typeof MESSAGE_SOURCE;
  type: 'hello';
}

export const MAX_FRAME_HEIGHT = 4000;
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
