'use client';

import useSWR from 'swr';
import { swrFetcher } from '@/lib/api/fetcher';
import type { Page } from '@/lib/validations/fields';

export type ListParams = Record<string, string | number | undefined>;

/** One server-side page of a list resource; the previous page stays on screen while the next loads. */
export function useList<T>(endpoint: string, params: ListParams) {
  const qs = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') qs.set(k, String(v));
  return useSWR<Page<T>>(`${endpoint}?${qs}`, swrFetcher, { keepPreviousData: true });
}
