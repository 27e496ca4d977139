import Link from 'next/link';
import { notFound } from 'next/navigation';
import { ScoringWorkbench } from '@/components/scoring/scoring-workbench';
import { getReadDetail } from '@/db/queries/reads';
import { ApiError } from '@/lib/api/errors';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'Read' };

export default async function ReadPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  let data;
  try {
    data = await getReadDetail(user, Number(id));
  } catch (err) {
    if (err instanceof ApiError && err.status === 404) notFound();
    if (err instanceof ApiError && err.status === 403) {
      return <p className="card">{err.message}</p>;
    }
    throw err;
  }
  const { read } = data;
  return (
    <div className="space-y-3">
      <p className="text-sm">
        <Link href={`/collections/${read.collectionId}`}>← Back to the collection</Link>
      </p>
      <ScoringWorkbench initial={data} />
    </div>
  );
}
