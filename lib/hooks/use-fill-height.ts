'use client';
// Gives an element the height that is left of the window below it (less a gap), on wide screens
// only, so the scoring canvas fills a laptop's window however many banners and bars sit above it
// (a banner appearing mid-read moves it down, and it shrinks to fit). Below `minWidth` the
// element keeps its own CSS height. Returns a callback ref.
import { useCallback, useEffect, useRef } from 'react';

export function useFillHeight<T extends HTMLElement>({ minWidth = 1024, minHeight = 340, gap = 16 } = {}): (el: T | null) => void {
  const elRef = useRef<T | null>(null);
  const fit = useCallback(() => {
    const el = elRef.current;
    if (!el) return;
    if (window.innerWidth < minWidth) {
      el.style.height = '';
      return;
    }
    // The top as laid out in the page (not the window), so scrolling does not change it.
    const top = el.getBoundingClientRect().top + window.scrollY;
    el.style.height = `${Math.max(minHeight, Math.floor(window.innerHeight - top - gap))}px`;
  }, [minWidth, minHeight, gap]);

  useEffect(() => {
    window.addEventListener('resize', fit);
    // Whatever above the element changes size (a banner, the bars wrapping) moves its top.
    const ro = new ResizeObserver(fit);
    const parent = elRef.current?.parentElement;
    if (parent) ro.observe(parent);
    ro.observe(document.body);
    fit();
    return () => {
      window.removeEventListener('resize', fit);
      ro.disconnect();
    };
  }, [fit]);

  return useCallback(
    (el: T | null) => {
      elRef.current = el;
      fit();
    },
    [fit],
  );
}
