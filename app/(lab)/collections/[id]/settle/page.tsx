import Link from 'next/link';
import { notFound } from 'next/navigation';
import { getCollection } from '@/db/queries/collections';
import { getSettleState } from '@/db/queries/settling';
import { getLabSettings } from '@/db/queries/settings';
import { SettleWorkbench } from '@/components/settling/settle-workbench';
import { nullIfNotFound } from '@/lib/api/errors';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDateTime } from '@/lib/format';

export const metadata = { title: 'Settle disagreements' };

export default async function SettlePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const c = await nullIfNotFound(getCollection(user, Number(id)));
  if (!c) notFound();
  const [state, settings] = await Promise.all([getSettleState(user, c.id), getLabSettings()]);
  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm">
          <Link href={`/collections/${c.id}`}>← Back to the collection</Link>
        </p>
        <h1>Settle disagreements</h1>
        <p className="text-sm text-ink-soft">
          {c.stallion} · collection of {fmtDateTime(c.collectedAt, settings.timeZone)}
          {state.first && state.second && (
            <>
              {' '}· first read by {state.first.readerName}, second read by {state.second.readerName}
            </>
          )}
          {state.settled && <> · settled by {state.settled.readerName}</>}
        </p>
      </div>
      {state.status === 'not-ready' ? <p className="card text-sm">{state.reason}</p> : <SettleWorkbench initial={state} />}
      <p className="text-xs text-ink-faint">
        Each disagreement is a cell one reader marked and the other did not, or a cell the two readers gave different classes (their marks paired one to one
        within the lab’s pairing distance). Figures support, and never replace, a veterinarian’s judgement.
      </p>
    </div>
  );
}
