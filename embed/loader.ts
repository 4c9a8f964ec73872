/**
 * Partwise calculator loader, for host pages:
 *
 *   <div data-partwise-calculator="TOKEN" data-partwise-title="Which ride group suits me?"></div>
 *   <script src="https://APP/embed.js" async></script>
 *
 * Replaces each placeholder with an iframe of the calculator and keeps the iframe as
 * tall as its content, from size messages the calculator posts to this page's exact
 * origin. Messages are accepted only from the app's origin, from that iframe's window,
 * and in the exact expected shape. No cookies, no globals beyond one marker.
 */
import { isSizeMessage, MAX_FRAME_HEIGHT, MESSAGE_SOURCE, TOKEN_PATTERN, type HelloMessage } from './protocol';

const ATTR = 'data-partwise-calculator';
const DONE = 'data-partwise-ready';

function scriptOrigin(): string | null {
  const script = document.currentScript as HTMLScriptElement | null;
  const src = script?.src || (document.querySelector('script[src$="/embed.js"]') as HTMLScriptElement | null)?.src;
  if (!src) return null;
  try {
    return new URL(src, location.href).origin;
  } catch {
    return null;
  }
}

interface Placed {
  frame: HTMLIFrameElement;
  token: string;
}

function start(appOrigin: string) {
  const placed: Placed[] = [];

  const mount = () => {
    document.querySelectorAll<HTMLElement>(`[${ATTR}]`).forEach((el) => {
      if (el.hasAttribute(DONE)) return;
      el.setAttribute(DONE, '');
      const token = (el.getAttribute(ATTR) || '').trim();
      if (!TOKEN_PATTERN.test(token)) {
        console.warn('[partwise] the calculator placeholder has no valid token:', token);
        return;
      }
      const frame = document.createElement('iframe');
      const src = new URL(`/embed/${encodeURIComponent(token)}`, appOrigin);
      src.searchParams.set('host', location.origin);
      frame.src = src.toString();
      frame.title = el.getAttribute('data-partwise-title') || 'Group membership calculator';
      frame.loading = 'lazy';
      frame.setAttribute('referrerpolicy', 'strict-origin-when-cross-origin');
      frame.style.cssText = 'display:block;width:100%;max-width:100%;border:0;height:560px;overflow:hidden;color-scheme:normal';
      frame.addEventListener('load', () => {
        const hello: HelloMessage = { source: MESSAGE_SOURCE, type: 'hello' };
        frame.contentWindow?.postMessage(hello, appOrigin);
      });
      el.replaceChildren(frame);
      placed.push({ frame, token });
    });
  };

  window.addEventListener('message', (event: MessageEvent) => {
    if (event.origin !== appOrigin || !isSizeMessage(event.data)) return;
    const data = event.data;
    const target = placed.find((p) => p.frame.contentWindow === event.source && p.token === data.token);
    if (!target) return;
    target.frame.style.height = `${Math.min(Math.ceil(data.height), MAX_FRAME_HEIGHT)}px`;
  });

  mount();
  // Placeholders added later (single-page sites) are picked up too.
  if (typeof MutationObserver !== 'undefined') new MutationObserver(mount).observe(document.documentElement, { childList: true, subtree: true });
}

(() => {
  const w = window as unknown as Record<string, unknown>;
  if (w.__partwiseLoader) return;
  w.__partwiseLoader = true;
  const origin = scriptOrigin();
  if (!origin) {
    console.warn('[partwise] could not tell where embed.js was loaded from.');
    return;
  }
  if (document.readyState === 'loading') document.addEventListener('DOMContentLoaded', () => start(origin));
  else start(origin);
})();
