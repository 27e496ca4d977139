import { listClassSets } from '@/db/queries/class-sets';
import { requirePageUser } from '@/lib/auth/session';
import { ClassSetEditor } from './_components/class-set-editor';

export const metadata = { title: 'Class sets' };

export default async function ClassSetsPage() {
  await requirePageUser(['lab_manager']);
  const sets = await listClassSets();
  return (
    <div className="space-y-4">
      <h1>Class sets</h1>
      <p className="text-sm text-ink-soft">
        The classes a reader gives each cell. Changes apply to reads started afterwards: every read keeps the set as it was when it began,
        so old results never change. Each class needs its own shape, so classes stay distinct without colour.
      </p>
      <ClassSetEditor sets={sets} />
    </div>
  );
}
