import Link from 'next/link';
import { getSettleState } from '@/db/queries/settling';
import type { CurrentUser } from '@/lib/auth/session';

/**
 * The collection page's way into the settle view: shown once both reads are submitted and
 * disagreements remain unsettled (nothing while a read is open, so a blind read stays blind).
 */
export async function SettleLink({ user, collectionId }: { user: CurrentUser; collectionId: number }) {
  const s = await getSettleState(user, collectionId);
  if (s.status !== 'open' || s.progress.total === 0) return null;
  return (
    <Link href={`/collections/${collectionId}/settle`} className={`${s.mayDecide ? 'btn' : 'btn-secondary'} no-underline hover:no-underline`}>
      {s.mayDecide ? 'Settle disagreements' : 'See the disagreements'} ({s.progress.decided} of {s.progress.total} settled)
    </Link>
  );
}
