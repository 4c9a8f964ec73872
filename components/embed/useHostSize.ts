'use client';
import { useEffect } from 'react';
import { isHelloMessage, MESSAGE_SOURCE, type SizeMessage } from '@/embed/protocol';

/**
 * Tell the host page our height whenever it changes, so the loader can size the iframe
 * without scrollbars. Messages go only to the host origin the server accepted (one of
 * the embed's allowed origins); nothing is sent when there is none.
 */
export function useHostSize(token: string, hostOrigin: string | null) {
  useEffect(() => {
    if (!hostOrigin || window.parent === window) return;
    const root = document.getElementById('partwise-calculator-root');
    if (!root) return;
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
      last = -1;
      send();
    };
    window.addEventListener('message', onMessage);
    send();
    return () => {
      observer.disconnect();
      window.removeEventListener('message', onMessage);
    };
  }, [token, hostOrigin]);
}
