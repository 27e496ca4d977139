import Link from 'next/link';
import { notFound } from 'next/navigation';
import { stallionHistory } from '@/db/queries/history';
import { getLabSettings } from '@/db/queries/settings';
import { nullIfNotFound } from '@/lib/api/errors';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDate } from '@/lib/format';
import { labDayKey } from '@/lib/time/lab-time';
import { historyQuery } from '@/lib/validations/health-event';
import { HistoryView } from './_components/history-view';

export const metadata = { title: 'Stallion history' };

export default async function StallionHistoryPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const sp = await searchParams;
  // A range in the address that does not parse falls back to the default season rather than failing the page.
  const q = historyQuery.safeParse({ from: typeof sp.from === 'string' ? sp.from : undefined, to: typeof sp.to === 'string' ? sp.to : undefined });
  const [history, settings] = await Promise.all([nullIfNotFound(stallionHistory(user, Number(id), q.success ? q.data : {})), getLabSettings()]);
  if (!history) notFound();
  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm text-ink-soft"><Link href={`/stallions/${history.stallion.id}`}>{history.stallion.name}</Link></p>
        <h1>History of {history.stallion.name}</h1>
        <p className="text-sm text-ink-soft">Collections over time with % normal, the main defect groups, sperm numbers and rest days; health events and their spermatogenic windows are marked.</p>
      </div>
      {history.reEvaluateFrom && (
        <p role="status" className="rounded-md bg-warn-bg px-4 py-3 text-sm text-warn">
          <span aria-hidden>⚑ </span>A health event’s window is open: <strong>re-evaluate from {fmtDate(history.reEvaluateFrom)}</strong>.
        </p>
      )}
      <HistoryView initial={history} today={labDayKey(new Date(), settings.timeZone)} />
    </div>
  );
}
