import Link from 'next/link';
import { collectionsAwaitingFirstRead, collectionsAwaitingSecondRead, collectionsReadyToSign, fileCounts, readsInProgress, reportsAmendedNotResigned, seasonOverview, userOverview } from '@/db/queries/dashboard';
import { getLabSettings } from '@/db/queries/settings';
import { countOf, fmtDate, fmtDateTime } from '@/lib/format';
import { ROLE_LABELS, STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { READ_KIND_LABELS } from '@/lib/reads/kinds';
import { mayRead } from '@/lib/reads/policy';
import { RecountFlag } from '@/components/reads/recount-flag';

export const metadata = { title: 'Dashboard' };

function Tiles({ tiles }: { tiles: { label: string; value: number | string; href: string }[] }) {
  return (
    <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
      {tiles.map((t) => (
        <li key={t.label}>
          <Link href={t.href} className="card block no-underline hover:border-brand hover:no-underline">
            <span className="block text-3xl font-semibold text-ink">{t.value}</span>
            <span className="text-sm text-ink-soft">{t.label}</span>
          </Link>
        </li>
      ))}
    </ul>
  );
}

/** A work list that another feature will fill: says what will appear, so the place is clear. */
function Upcoming({ id, title, children }: { id: string; title: string; children: React.ReactNode }) {
  return (
    <section aria-labelledby={id} className="card">
      <h2 id={id} className="mb-1">{title}</h2>
      <p className="text-sm text-ink-soft">{children}</p>
    </section>
  );
}

export default async function DashboardPage() {
  const user = await requirePageUser(STAFF_ROLES);
  const { timeZone, secondReadRequired } = await getLabSettings();
  const reader = mayRead(user.role);
  const manager = user.role === 'lab_manager';
  const vet = user.role === 'veterinarian';
  const [season, files, waiting, inProgress, waitingSecond, users, toSign, amended] = await Promise.all([
    seasonOverview(timeZone),
    fileCounts(),
    reader ? collectionsAwaitingFirstRead() : Promise.resolve([]),
    reader ? readsInProgress(user) : Promise.resolve([]),
    reader ? collectionsAwaitingSecondRead(user) : Promise.resolve([]),
    manager ? userOverview() : Promise.resolve(null),
    vet ? collectionsReadyToSign() : Promise.resolve([]),
    vet ? reportsAmendedNotResigned() : Promise.resolve([]),
  ]);
  const seasonLabel = season ? `Season ${season.year}, ${fmtDate(season.from, timeZone)} – ${fmtDate(season.to, timeZone)}` : 'No collections recorded yet';

  return (
    <div className="space-y-6">
      <div>
        <h1>Good to see you, {user.name}</h1>
        <p className="text-sm text-ink-soft">Signed in as {ROLE_LABELS[user.role]}.</p>
      </div>

      <section aria-labelledby="season" className="space-y-2">
        <h2 id="season">{seasonLabel}</h2>
        <Tiles
          tiles={[
            { label: 'Collections this season', value: season?.collections ?? 0, href: '/collections' },
            { label: 'Stallions collected this season', value: season?.stallionsCollected ?? 0, href: '/stallions' },
            { label: 'First reads submitted this season', value: season?.firstReadsSubmitted ?? 0, href: '/collections' },
            { label: `Stallions on file · ${files.clients} clients`, value: files.stallions, href: '/stallions' },
          ]}
        />
      </section>

      {reader && (
        <div className="grid gap-4 lg:grid-cols-2">
          <section aria-labelledby="waiting" className="card">
            <h2 id="waiting" className="mb-2">Waiting for a first read</h2>
            {waiting.length === 0 ? (
              <p className="text-sm text-ink-soft">Every collection with field images has a first read.</p>
            ) : (
              <ul className="divide-y divide-line text-sm">
                {waiting.map((c) => (
                  <li key={c.id} className="flex flex-wrap justify-between gap-2 py-2">
                    <Link href={`/collections/${c.id}`}>{c.stallion} · {fmtDateTime(c.collectedAt, timeZone)}</Link>
                    <span className="text-ink-soft">{countOf(c.images, 'image')} · not started</span>
                  </li>
                ))}
              </ul>
            )}
          </section>
          <section aria-labelledby="in-progress" className="card">
            <h2 id="in-progress" className="mb-2">Reads in progress</h2>
            {inProgress.length === 0 ? (
              <p className="text-sm text-ink-soft">No read is open.</p>
            ) : (
              <ul className="divide-y divide-line text-sm">
                {inProgress.map((r) => (
                  <li key={r.readId} className="flex flex-wrap justify-between gap-2 py-2">
                    <Link href={r.mine ? `/reads/${r.readId}` : `/collections/${r.collectionId}`}>
                      {r.stallion} · {fmtDateTime(r.collectedAt, timeZone)}
                    </Link>
                    <span className="text-ink-soft">
                      {READ_KIND_LABELS[r.kind]} · {r.mine ? 'yours' : r.readerName} · {countOf(r.marks, 'mark')}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </section>
        </div>
      )}

      {reader && (
        <div className="grid gap-4 lg:grid-cols-2">
          <section aria-labelledby="waiting-second" className="card">
            <h2 id="waiting-second" className="mb-1">Waiting for a second read</h2>
            <p className="mb-2 text-xs text-ink-faint">
              {secondReadRequired
                ? 'Blind second reads you may make (never your own first reads), and recounts where the two reads differ too much.'
                : 'The lab does not require a second read before a report (Lab settings), so only recounts are listed; a second read can still be started from a collection’s page.'}
            </p>
            {waitingSecond.length === 0 ? (
              <p className="text-sm text-ink-soft">No collection is waiting for a second read by you.</p>
            ) : (
              <ul className="divide-y divide-line text-sm">
                {waitingSecond.map((c) => (
                  <li key={c.id} className="flex flex-wrap justify-between gap-2 py-2">
                    <Link href={`/collections/${c.id}`}>{c.stallion} · {fmtDateTime(c.collectedAt, timeZone)}</Link>
                    <span className="text-ink-soft">{c.recount ? <RecountFlag compact /> : `first read by ${c.firstReader}`}</span>
                  </li>
                ))}
              </ul>
            )}
          </section>
          <Upcoming id="to-settle" title="Disagreements to settle">
            Collections whose two reads disagree on some cells will be listed here once settling is part of Fieldmark.
          </Upcoming>
        </div>
      )}
      {vet && (
        <section aria-labelledby="to-sign" className="card space-y-3">
          <h2 id="to-sign">Reports to sign</h2>
          <div className="grid gap-4 lg:grid-cols-2">
            <section aria-labelledby="ready-to-sign">
              <h3 id="ready-to-sign" className="mb-1 font-medium">Ready to sign</h3>
              {toSign.length === 0 ? (
                <p className="text-sm text-ink-soft">No collection is waiting for your sign-off.</p>
              ) : (
                <ul className="divide-y divide-line text-sm">
                  {toSign.map((c) => (
                    <li key={c.id} className="flex flex-wrap justify-between gap-2 py-2">
                      <Link href={`/collections/${c.id}/report`}>{c.stallion} · {fmtDateTime(c.collectedAt, timeZone)}</Link>
                      <span className="text-ink-soft">{c.basis === 'settled' ? 'settled read' : 'single read'}</span>
                    </li>
                  ))}
                </ul>
              )}
            </section>
            <section aria-labelledby="amended">
              <h3 id="amended" className="mb-1 font-medium">Amended, not signed again</h3>
              {amended.length === 0 ? (
                <p className="text-sm text-ink-soft">No amended report is waiting.</p>
              ) : (
                <ul className="divide-y divide-line text-sm">
                  {amended.map((r) => (
                    <li key={r.reportId} className="space-y-0.5 py-2">
                      <Link href={`/collections/${r.collectionId}/report`}>{r.stallion} · {fmtDateTime(r.collectedAt, timeZone)}</Link>
                      <span className="block text-ink-soft">Version {r.version} amended by {r.amendedBy}, {fmtDate(r.amendedAt, timeZone)}: {r.reason}</span>
                    </li>
                  ))}
                </ul>
              )}
            </section>
          </div>
        </section>
      )}

      {manager && users && (
        <section aria-labelledby="admin" className="card space-y-3">
          <h2 id="admin">Users and settings</h2>
          <ul className="grid gap-3 sm:grid-cols-3 text-sm">
            <li>
              <Link href="/admin/users" className="font-medium">Users</Link>
              <span className="block text-ink-soft">
                {countOf(users.active.technician, 'technician')}, {countOf(users.active.veterinarian, 'veterinarian')},{' '}
                {countOf(users.active.lab_manager, 'lab manager')}, {countOf(users.active.client, 'client')} ·{' '}
                {countOf(users.invitationsOpen, 'invitation')} not yet taken up · {users.deactivated} deactivated
              </span>
            </li>
            <li>
              <Link href="/admin/class-sets" className="font-medium">Class sets</Link>
              <span className="block text-ink-soft">The classes readers give each cell; a read keeps the set it started with.</span>
            </li>
            <li>
              <Link href="/admin/settings" className="font-medium">Lab settings</Link>
              <span className="block text-ink-soft">Target cells per read, dose sizes, breeding-soundness threshold, the lab’s time zone.</span>
            </li>
          </ul>
          <p className="text-sm text-ink-soft">Reader agreement figures will appear here once second reads are part of Fieldmark.</p>
        </section>
      )}
    </div>
  );
}
