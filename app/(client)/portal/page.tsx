import { ownStallions } from '@/db/queries/stallions';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'My stallions' };

export default async function PortalPage() {
  const user = await requirePageUser(['client']);
  const stallions = await ownStallions(user);
  return (
    <div className="space-y-4">
      <h1>My stallions</h1>
      <p className="text-sm text-ink-soft">Signed morphology reports of your stallions appear here once a veterinarian has signed them.</p>
      {stallions.length === 0 ? (
        <p className="card">No stallions are linked to your account yet.</p>
      ) : (
        <ul className="grid gap-3 sm:grid-cols-2">
          {stallions.map((s) => (
            <li key={s.id} className="card">
              <p className="font-medium">{s.name}</p>
              <p className="text-sm text-ink-soft">{[s.breed, s.registration].filter(Boolean).join(' · ')}</p>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
