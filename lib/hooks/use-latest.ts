'use client';

import { useLayoutEffect, useRef, type RefObject } from 'react';

/**
 * A ref that always holds the latest value, for event handlers and timers registered once.
 * It is updated after each commit (not during render, which React may repeat or discard), and
 * before any effect or event of that commit can read it.
 */
export function useLatest<T>(value: T): RefObject<T> {
  const ref = useRef(value);
  useLayoutEffect(() => {
    ref.current = value;
  });
  return ref;
}
