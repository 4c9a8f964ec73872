'use client';
import { useEffect } from 'react';
import { isHelloMessage, MESSAGE_SOURCE, type ReadyMessage, type SizeMessage } from '@/embed/protocol';

/**
 * Tell the host page that the calculator is up ("ready") and its height whenever it
 * changes, so the loader can size the iframe without scrollbars (and knows the browser
 * did not refuse the frame). Messages go only to the host origin the server accepted
 * (one of the embed's allowed origins); nothing is sent when there is none.
 */
export function useHostSize(token: string, hostOrigin: string | null) {
  useEffect(() => {
    if (!hostOrigin || window.parent === window) return;
    const root = document.getElementById('partwise-calculator-root');
    if (!root) return;
    const ready: ReadyMessage = { source: MESSAGE_SOURCE, type: 'ready', token };
    let last = -1;
    const send = () => {
      const height = Math.ceil(root.getBoundingClientRect().height);
      if (height === last) return;
      last = height;
      const message: SizeMessage = { source: MESSAGE_SOURCE, type: 'size', token, height };
      window.parent.postMessage(message, hostOrigin);
    };
    const observer = new ResizeObserver(send);
    observer.observe(root);
    const onMessage = (event: MessageEvent) => {
      if (event.origin !== hostOrigin || event.source !== window.parent || !isHelloMessage(event.data)) return;
      window.parent.postMessage(ready, hostOrigin);
      last = -1;
      send();
    };
    window.addEventListener('message', onMessage);
    window.parent.postMessage(ready, hostOrigin);
    send();
    return () => {
      observer.disconnect();
      window.removeEventListener('message', onMessage);
    };
  }, [token, hostOrigin]);
}

/** For pages without the form (a calculator switched off): still size the frame and say it is up. */
export function HostLink({ token, hostOrigin }: { token: string; hostOrigin: string | null }) {
  useHostSize(token, hostOrigin);
  return null;
}
