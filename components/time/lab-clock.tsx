'use client';

import { createContext, useContext } from 'react';
import { DEFAULT_TIME_ZONE } from '@/lib/time/lab-time';

const LabTimeZone = createContext<string>(DEFAULT_TIME_ZONE);

/** Gives client components the lab's time zone (a lab setting), read once per page on the server. */
export function LabClockProvider({ timeZone, children }: { timeZone: string; children: React.ReactNode }) {
  return <LabTimeZone.Provider value={timeZone}>{children}</LabTimeZone.Provider>;
}

/** The lab's time zone, for showing and entering times on its wall clock. */
export function useLabTimeZone(): string {
  return useContext(LabTimeZone);
}
