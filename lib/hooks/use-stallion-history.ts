'use client';

import useSWR from 'swr';
import type { StallionHistory } from '@/db/queries/history';
import { swrFetcher } from '@/lib/api/fetcher';
import type { DateRange } from '@/lib/history/range';

export const historyUrl = (stallionId: number, range: DateRange) => `/api/stallions/${stallionId}/history?${new URLSearchParams({ from: range.from, to: range.to })}`;

/** A stallion's history over a range (GET /api/stallions/:id/history); the server's first answer seeds it. */
export function useStallionHistory(stallionId: number, range: DateRange, initial: StallionHistory) {
  const seeded = initial.range.from === range.from && initial.range.to === range.to;
  return useSWR<StallionHistory>(historyUrl(stallionId, range), swrFetcher, {
    fallbackData: seeded ? initial : undefined,
    keepPreviousData: true,
    revalidateOnFocus: false,
    revalidateOnMount: !seeded,
  });
}
