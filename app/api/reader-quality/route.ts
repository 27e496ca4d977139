import { getReaderQuality } from '@/db/queries/reader-quality';
import { getLabSettings } from '@/db/queries/settings';
import { route } from '@/lib/api/handler';
import { labDayKey } from '@/lib/time/lab-time';
import { qualityPeriod, readerQualityQuery } from '@/lib/validations/reader-quality';

/** Per-reader agreement figures over a period (lab manager). */
export const GET = route({ roles: ['lab_manager'], query: readerQualityQuery }, async ({ user, query }) =>
  getReaderQuality(user, qualityPeriod(query, labDayKey(new Date(), (await getLabSettings()).timeZone))),
);
