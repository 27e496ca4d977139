import Link from 'next/link';
import { notFound } from 'next/navigation';
import { collectionsAround, getCollection } from '@/db/queries/collections';
import { morphologyForCollection } from '@/db/queries/morphology';
import { agreementOrNull } from '@/db/queries/agreement';
import { listReads } from '@/db/queries/reads';
import { AgreementFigures } from '@/components/reads/agreement-figures';
import { RecountFlag } from '@/components/reads/recount-flag';
import { collectionReportState } from '@/db/queries/reports';
import { getLabSettings } from '@/db/queries/settings';
import { MorphologySummary } from '@/components/reads/morphology-summary';
import { StartReadButton } from '@/components/reads/start-read-button';
import { nullIfNotFound } from '@/lib/api/errors';
import { READER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { FieldImages } from '@/components/images/gallery';
import { WindowFlag } from '@/components/history/window-flag';
import { requirePageUser } from '@/lib/auth/session';
import { OPEN, READ_KIND_LABELS, SECOND_READ, readLabel } from '@/lib/reads/kinds';
import type { ReadAction } from '@/lib/reads/policy';
import { figuresBasis, readActionsFor } from '@/lib/reads/policy';
import { billions, fmt, fmtDateTime } from '@/lib/format';
import { soundnessForCollection, summariseCollection } from '@/lib/semen/summary';
import { OPTICS, PREPARATIONS } from '@/lib/validations/collection';

export const metadata = { title: 'Collection' };

const DOSE_LABEL = { fresh: 'Fresh', cooled: 'Cooled, shipped', frozen: 'Frozen' } as const;

export default async function CollectionPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const c = await nullIfNotFound(getCollection(user, Number(id)));
  if (!c) notFound();
  const [settings, around, reads, allReads, agreement, report] = await Promise.all([
    getLabSettings(),
    collectionsAround(c.stallionId, new Date(c.collectedAt)),
    morphologyForCollection(user, c.id),
    listReads(user, c.id),
    agreementOrNull(user, c.id),
    collectionReportState(c.id),
  ]);
  // While a signed report locks the collection, the database refuses every change; the page offers none.
  const locked = report.state === 'signed';
  const basis = figuresBasis(reads);
  const normalPct = basis?.read.morphology.pctNormal ?? null;
  // Every read, seen or not, decides what may start (an open second read hidden from this user still blocks another).
  const actions = locked ? [] : readActionsFor(user, allReads, { recountAdvised: agreement?.recountAdvised ?? false });
  const hidden = allReads.filter((r) => !r.visible);
  const blind = allReads.some((r) => r.kind === SECOND_READ && r.status === OPEN && r.readerId === user.id);
  const classNames = new Map(reads.flatMap((r) => r.morphology.cells.perClass.map((p) => [p.classId, p.name] as const)));
  const basisLabel =
    basis?.basis === 'settled'
      ? 'settled read'
      : !agreement
        ? 'first read (not yet checked by a second reader)'
        : agreement.disagreements === 0
          ? 'first read (the second read agrees with it cell for cell)'
          : `first read (checked by a second reader; ${agreement.disagreements} disagreement${agreement.disagreements === 1 ? '' : 's'} not settled yet)`;
  const actionLabel = (a: ReadAction) =>
    a.action === 'continue' ? `Continue ${READ_KIND_LABELS[a.kind].toLowerCase()}` : a.kind === SECOND_READ && a.recount ? 'Start a recount (further second read)' : `Start ${READ_KIND_LABELS[a.kind].toLowerCase()}`;
  const s = summariseCollection(c, settings, normalPct);
  const bse = soundnessForCollection(
    c.id,
    around.map((a) => ({ id: a.id, collectedAt: a.collectedAt, pmmnBillion: a.id === c.id ? s.totals?.pmmnBillion ?? null : null })),
    settings,
  );

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <p className="text-sm text-ink-soft"><Link href={`/stallions/${c.stallionId}`}>{c.stallion}</Link></p>
          <h1>Collection of {fmtDateTime(c.collectedAt, settings.timeZone)}</h1>
          <p className="text-sm text-ink-soft">
            Ejaculate {c.numberThatDay} of that day ·{' '}
            {c.daysSincePrevious == null ? 'first collection on record' : `${fmt(c.daysSincePrevious)} days since the previous collection`} · recorded by {c.recordedBy}
            {c.collectedBy ? ` · collected by ${c.collectedBy}` : ''}
          </p>
        </div>
        {!locked && <Link href={`/collections/${c.id}/edit`} className="btn-secondary no-underline hover:no-underline">Edit</Link>}
      </div>

      <WindowFlag flag={c.window} />

      <section aria-labelledby="report-heading" className="card flex flex-wrap items-center justify-between gap-3">
        <div>
          <h2 id="report-heading">Report</h2>
          <p className="text-sm" data-testid="collection-report-state">
            {report.state === 'draft' && 'Draft — not signed yet.'}
            {report.state === 'signed' && <>Signed, version {report.version}. The collection’s records, reads, marks and images are locked; an amendment unlocks them.</>}
            {report.state === 'amended' && <>Amended: version {report.version} is withdrawn for correction and the collection is open again until the report is signed again.</>}
          </p>
        </div>
        <div className="flex gap-2">
          {report.reportId && <Link href={`/reports/${report.reportId}`} className="btn-secondary no-underline hover:no-underline">Signed version {report.version}</Link>}
          <Link href={`/collections/${c.id}/report`} className="btn no-underline hover:no-underline">{report.state === 'signed' ? 'Report' : 'Report and sign-off'}</Link>
        </div>
      </section>

      {s.warnings.length > 0 && (
        <ul aria-label="Warnings" className="space-y-1 rounded-md bg-warn-bg px-4 py-3 text-sm text-warn">
          {s.warnings.map((w) => <li key={w.field + w.message}>⚠ {w.message}.</li>)}
        </ul>
      )}

      <div className="grid gap-4 lg:grid-cols-2">
        <section aria-labelledby="params" className="card">
          <h2 id="params" className="mb-3">Semen parameters</h2>
          <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
            <dt className="text-ink-soft">Gel-free volume</dt><dd>{fmt(c.volumeMl)} mL</dd>
            <dt className="text-ink-soft">Concentration</dt>
            <dd>
              {fmt(c.concentrationMillionPerMl)} × 10⁶/mL
              {c.concentrationMethod === 'chamber' && (
                <span className="block text-xs text-ink-faint">
                  counting chamber: 1:{c.chamberDilution}, {c.chamberSquares} squares, counts {c.chamberCount1} and {c.chamberCount2}
                </span>
              )}
            </dd>
            <dt className="text-ink-soft">Total motility</dt><dd>{fmt(c.totalMotilityPct, 0)} %</dd>
            <dt className="text-ink-soft">Progressive motility</dt><dd>{fmt(c.progressiveMotilityPct, 0)} %</dd>
            <dt className="text-ink-soft">Preparation</dt><dd>{PREPARATIONS[c.preparation]}, {OPTICS[c.optics]}, {c.magnification}×</dd>
          </dl>
          {c.remarks && <p className="mt-3 whitespace-pre-wrap text-sm"><span className="text-ink-soft">Remarks: </span>{c.remarks}</p>}
        </section>

        <section aria-labelledby="arith" className="card">
          <h2 id="arith" className="mb-3">Sperm numbers</h2>
          {s.totals ? (
            <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
              <dt className="text-ink-soft">Total sperm</dt><dd data-testid="total-sperm">{billions(s.totals.totalSpermBillion)}</dd>
              <dt className="text-ink-soft">Total motile</dt><dd>{billions(s.totals.totalMotileBillion)}</dd>
              <dt className="text-ink-soft">Progressively motile (PMS)</dt><dd data-testid="pms">{billions(s.totals.progressivelyMotileBillion)}</dd>
              <dt className="text-ink-soft">Progressively motile, morphologically normal (PMMN)</dt>
              <dd data-testid="pmmn">
                {s.totals.pmmnBillion == null ? (
                  <span className="text-ink-faint">waiting for the morphology read</span>
                ) : (
                  <>
                    {billions(s.totals.pmmnBillion)}
                    <span className="block text-xs text-ink-faint">
                      at {fmt(normalPct)} % normal from the {basisLabel}
                    </span>
                  </>
                )}
              </dd>
            </dl>
          ) : (
            <p className="text-sm text-ink-soft">Missing {s.missing.join(', ')}: the numbers appear once they are recorded.</p>
          )}
        </section>
      </div>

      {s.totals && (
        <section aria-labelledby="doses" className="card overflow-x-auto">
          <h2 id="doses" className="mb-3">Insemination doses</h2>
          <table>
            <thead>
              <tr><th className="th">Kind</th><th className="th">Dose size (lab setting)</th><th className="th">Whole doses</th><th className="th">Left over</th></tr>
            </thead>
            <tbody>
              {s.doses.map((d) => (
                <tr key={d.kind}>
                  <td className="td">{DOSE_LABEL[d.kind]}</td>
                  <td className="td">{billions(d.sizeBillion)} {d.basis === 'progressive' ? 'progressively motile' : 'total'} sperm</td>
                  <td className="td font-medium">{d.doses}</td>
                  <td className="td">{billions(d.remainderBillion)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-2 text-xs text-ink-faint">Dose sizes are set by the lab manager under Lab settings.</p>
        </section>
      )}

      <section aria-labelledby="morph-heading" className="space-y-3">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <h2 id="morph-heading">Morphology</h2>
          {actions.map((a) =>
            a.action === 'continue' ? (
              <Link key={a.readId} href={`/reads/${a.readId}`} className="btn no-underline hover:no-underline">{actionLabel(a)}</Link>
            ) : (
              <StartReadButton key={a.kind} collectionId={c.id} kind={a.kind} label={actionLabel(a)} />
            ),
          )}
        </div>
        {blind && (
          <p role="note" className="rounded-md bg-brand-light px-4 py-3 text-sm">
            Your second read of this collection is blind: the other reads’ marks and figures stay hidden until you submit it.
          </p>
        )}
        {agreement?.recountAdvised && (
          <RecountFlag detail={agreement.acceptableDifference ? `(${fmt(agreement.percentNormal.first)} % against ${fmt(agreement.percentNormal.second)} %: ${fmt(agreement.acceptableDifference.difference)} points apart, limit ${fmt(agreement.acceptableDifference.limit)}.)` : undefined} />
        )}
        <MorphologySummary reads={reads} />
        {!blind && hidden.length > 0 && (
          <ul aria-label="Reads not shown" className="space-y-1 text-sm text-ink-soft">
            {hidden.map((r) => (
              <li key={r.id}>{readLabel(r)} by {r.readerName} is in progress; it is blind, and its figures appear once it is submitted.</li>
            ))}
          </ul>
        )}
        {agreement && <AgreementFigures a={agreement} names={classNames} />}
      </section>

      <section aria-labelledby="images-heading" className="space-y-3">
        <h2 id="images-heading">Field images</h2>
        <FieldImages collectionId={c.id} canUpload={!locked && READER_ROLES.includes(user.role)} defaults={{ magnification: c.magnification, optics: c.optics }} />
      </section>

      <section aria-labelledby="bse" className="card">
        <h2 id="bse" className="mb-2">Breeding soundness (second of two ejaculates)</h2>
        {bse.role === 'second' ? (
          bse.result.status === 'unknown' ? (
            <p className="text-sm">Second ejaculate, {Math.round(bse.gapMinutes)} min after <Link href={`/collections/${bse.firstId}`}>the first</Link>. The check needs PMMN: waiting for the morphology read.</p>
          ) : (
            <p className="text-sm">
              PMMN {billions(bse.result.pmmnBillion)} against the lab’s threshold of {billions(bse.result.thresholdBillion)}:{' '}
              <strong className={bse.result.passes ? 'text-ok' : 'text-danger'}>{bse.result.passes ? 'meets the threshold' : 'below the threshold'}</strong>.
            </p>
          )
        ) : bse.role === 'first' ? (
          <p className="text-sm">First of a pair; the check applies to <Link href={`/collections/${bse.secondId}`}>the second ejaculate</Link> ({Math.round(bse.gapMinutes)} min later).</p>
        ) : (
          <p className="text-sm text-ink-soft">Not part of a pair collected about {settings.pairGapMinutes} min apart, so no breeding-soundness check applies.</p>
        )}
        <p className="mt-2 text-xs text-ink-faint">
          Figures support, and never replace, a veterinarian’s judgement; breeding decisions follow local regulations and licensed veterinary practice.
        </p>
      </section>
    </div>
  );
}
