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
 *
 * A frame that says nothing within a few seconds of loading was refused by the browser
 * (this site is not on the calculator's allowed list, or the address is unknown): it is
 * hidden and a short neutral notice takes its place, instead of a broken-frame icon. A
 * sign of life arriving later (a slow device) brings the calculator back.
 */
import { loaderLanguage, loaderMessages, type LoaderMessages } from './loader-messages';
import { isReadyMessage, isSizeMessage, MAX_FRAME_HEIGHT, MESSAGE_SOURCE, READY_TIMEOUT_MS, TOKEN_PATTERN, type HelloMessage } from './protocol';

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
  alive: boolean;
  notice: HTMLElement | null;
}

const NOTICE_ATTR = 'data-partwise-notice';

/** The host page's stand-in for a refused frame: plain text in the page's own font, nothing about the allowed sites. */
function refusedNotice(t: LoaderMessages): HTMLElement {
  const box = document.createElement('div');
  box.setAttribute(NOTICE_ATTR, '');
  box.setAttribute('role', 'status');
  box.style.cssText = 'box-sizing:border-box;max-width:100%;margin:0;padding:12px 16px;border:1px solid rgba(128,128,128,.45);border-radius:8px;font:inherit;font-size:15px;line-height:1.45;color:inherit;background:transparent';
  const title = document.createElement('p');
  title.style.cssText = 'margin:0;font-weight:bold';
  title.textContent = t.refusedTitle;
  const hint = document.createElement('p');
  hint.style.cssText = 'margin:4px 0 0;font-size:13px;opacity:.8';
  hint.textContent = t.refusedHint;
  box.append(title, hint);
  return box;
}

function markAlive(p: Placed) {
  p.alive = true;
  if (!p.notice) return;
  p.notice.remove();
  p.notice = null;
  p.frame.style.display = 'block';
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
      // The notice and default title speak the host page's language (or the placeholder's data-partwise-language).
      const language = loaderLanguage(el.getAttribute('data-partwise-language'), document.documentElement.lang);
      const t = loaderMessages[language];
      frame.title = el.getAttribute('data-partwise-title') || t.frameTitle;
      frame.loading = 'lazy';
      frame.setAttribute('referrerpolicy', 'strict-origin-when-cross-origin');
      frame.style.cssText = 'display:block;width:100%;max-width:100%;border:0;height:560px;overflow:hidden;color-scheme:normal';
      const entry: Placed = { frame, token, alive: false, notice: null };
      let timer: ReturnType<typeof setTimeout> | undefined;
      frame.addEventListener('load', () => {
        const hello: HelloMessage = { source: MESSAGE_SOURCE, type: 'hello' };
        frame.contentWindow?.postMessage(hello, appOrigin);
        // The browser fires load for a refused frame too (its error page), so load starts the wait.
        clearTimeout(timer);
        timer = setTimeout(() => {
          if (entry.alive || entry.notice || !frame.isConnected) return;
          entry.notice = refusedNotice(t);
          entry.notice.lang = language;
          frame.style.display = 'none';
          frame.after(entry.notice);
        }, READY_TIMEOUT_MS);
      });
      el.replaceChildren(frame);
      placed.push(entry);
    });
  };

  window.addEventListener('message', (event: MessageEvent) => {
    if (event.origin !== appOrigin) return;
    const data = event.data;
    if (!isSizeMessage(data) && !isReadyMessage(data)) return;
    const target = placed.find((p) => p.frame.contentWindow === event.source && p.token === data.token);
    if (!target) return;
    markAlive(target);
    if (data.type === 'size') target.frame.style.height = `${Math.min(Math.ceil(data.height), MAX_FRAME_HEIGHT)}px`;
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
