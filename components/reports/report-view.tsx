import type { ReactNode } from 'react';
import { billions, fmt, fmtDate, fmtDateTime } from '@/lib/format';
import type { ReportContent } from '@/lib/reports/draft';
import {
  BASIS_LABELS,
  BSE_STATUS_LABELS,
  CELLS_VIEW_LABEL,
  DEFECT_FREQUENCY_LABEL,
  DOSE_LABELS,
  GROUP_LABELS,
  KAPPA_BAND_LABELS,
  REPORT_TITLE,
  sourceLine,
  supersededLine,
  versionLine,
} from '@/lib/reports/labels';
import { isTimeZone } from '@/lib/time/lab-time';

/*
 * The report as a page: the same sections, words and figures as the PDF (lib/reports/pdf), for a
 * draft (no signature yet) or a signed version. Server component.
 */

const pct = (v: number | null | undefined, digits = 1) => (v == null ? '—' : `${fmt(v, digits)} %`);

function Section({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="space-y-2">
      <h3 id={id} className="text-base font-semibold">{title}</h3>
      {children}
    </section>
  );
}

function KV({ k, children }: { k: string; children: ReactNode }) {
  return (
    <>
      <dt className="text-ink-soft">{k}</dt>
      <dd>{children}</dd>
    </>
  );
}

const person = (p: { name: string; qualifications: string | null } | null) => (p ? (p.qualifications ? `${p.name}, ${p.qualifications}` : p.name) : '—');

export function ReportView({ report: r, idPrefix = 'report' }: { report: ReportContent; idPrefix?: string }) {
  const tz = isTimeZone(r.settings.timeZone) ? r.settings.timeZone : 'UTC';
  const when = (iso: string) => fmtDateTime(iso, tz);
  const m = r.morphology;
  const v = r.semen;
  const id = (s: string) => `${idPrefix}-${s}`;
  const superseded = r.report ? supersededLine(r.report) : null;
  const maxPct = m ? Math.max(1, ...m.perClass.map((c) => c.pct ?? 0)) : 1;

  return (
    <article aria-label={REPORT_TITLE} className="card space-y-6">
      <header className="space-y-1">
        <p className="text-sm font-medium">{r.lab.name || <span className="text-warn">Lab name not set (Lab settings)</span>}</p>
        {r.lab.address && <p className="text-xs text-ink-soft">{r.lab.address}</p>}
        <h2>{REPORT_TITLE}</h2>
        <p>
          {r.stallion.name} — collected {when(r.collection.collectedAt)}
        </p>
        {r.report ? (
          <p className="text-sm">
            {versionLine(r.report)} · verification code <span className="font-mono">{r.report.verificationCode}</span>
          </p>
        ) : (
          <p className="text-sm font-medium text-warn">Draft — not signed. The figures may still change until a veterinarian signs.</p>
        )}
        {superseded && <p className="rounded-md bg-warn-bg px-3 py-2 text-sm text-warn">{superseded}</p>}
      </header>

      <div className="grid gap-4 md:grid-cols-2">
        <Section id={id('stallion')} title="Stallion">
          <dl className="grid grid-cols-[9rem_1fr] gap-x-3 gap-y-1 text-sm">
            <KV k="Name">{r.stallion.name}</KV>
            <KV k="Breed">{r.stallion.breed ?? '—'}</KV>
            <KV k="Registration">{r.stallion.registration ?? '—'}</KV>
            <KV k="Foaled">{r.stallion.foalingYear ?? '—'}</KV>
            <KV k="Owner">{r.stallion.owner?.name ?? '—'}</KV>
          </dl>
        </Section>
        <Section id={id('collection')} title="Collection">
          <dl className="grid grid-cols-[9rem_1fr] gap-x-3 gap-y-1 text-sm">
            <KV k="Collected">{when(r.collection.collectedAt)}</KV>
            <KV k="Ejaculate of the day">{r.collection.ejaculateOfDay}</KV>
            <KV k="Since previous">
              {r.collection.daysSincePrevious === null
                ? 'first collection on record'
                : r.collection.daysSincePrevious === 0
                  ? 'same day'
                  : `${r.collection.daysSincePrevious} day${r.collection.daysSincePrevious === 1 ? '' : 's'}`}
            </KV>
            <KV k="Preparation">{r.collection.stain ? `${r.collection.preparation}, ${r.collection.stain}` : r.collection.preparation}</KV>
            <KV k="Optics">{`${r.collection.optics}, ×${r.collection.magnification}`}</KV>
            {r.collection.collectedBy && <KV k="Collected by">{r.collection.collectedBy}</KV>}
          </dl>
          {r.collection.notes && <p className="text-sm text-ink-soft">Notes: {r.collection.notes}</p>}
        </Section>
      </div>

      <Section id={id('semen')} title="Semen parameters and arithmetic">
        <table aria-label="Semen parameters and arithmetic">
          <thead>
            <tr><th className="th">Parameter</th><th className="th text-right">Value</th><th className="th">How</th></tr>
          </thead>
          <tbody>
            <tr><td className="td">Gel-free volume</td><td className="td text-right">{v.volumeMl === null ? '—' : `${fmt(v.volumeMl, 1)} mL`}</td><td className="td">measured</td></tr>
            <tr><td className="td">Concentration</td><td className="td text-right">{v.concentrationMillionPerMl === null ? '—' : `${fmt(v.concentrationMillionPerMl, 0)} × 10⁶/mL`}</td><td className="td">{v.concentrationMethod === 'chamber' ? 'counting chamber, two counts' : 'entered'}</td></tr>
            <tr><td className="td">Total motility</td><td className="td text-right">{pct(v.totalMotilityPct, 0)}</td><td className="td">assessed</td></tr>
            <tr><td className="td">Progressive motility</td><td className="td text-right">{pct(v.progressiveMotilityPct, 0)}</td><td className="td">assessed</td></tr>
            <tr><td className="td">Total sperm</td><td className="td text-right">{billions(v.totalSpermBillion)}</td><td className="td">volume × concentration</td></tr>
            <tr><td className="td">Total motile sperm</td><td className="td text-right">{billions(v.totalMotileBillion)}</td><td className="td">total × % motile</td></tr>
            <tr><td className="td">Progressively motile sperm (PMS)</td><td className="td text-right">{billions(v.progressivelyMotileBillion)}</td><td className="td">total × % progressive</td></tr>
            <tr className="font-medium"><td className="td">Progressively motile, morphologically normal (PMMN)</td><td className="td text-right">{billions(v.pmmnBillion)}</td><td className="td">PMS × % normal ({pct(v.normalPctUsed)})</td></tr>
          </tbody>
        </table>
        {v.doses.length > 0 && (
          <table aria-label="Insemination doses">
            <thead>
              <tr><th className="th">Dose</th><th className="th">Size (this lab)</th><th className="th text-right">Doses</th><th className="th text-right">Left over</th></tr>
            </thead>
            <tbody>
              {v.doses.map((d) => (
                <tr key={d.kind}>
                  <td className="td">{DOSE_LABELS[d.kind]}</td>
                  <td className="td">{billions(d.sizeBillion)} {BASIS_LABELS[d.basis]}</td>
                  <td className="td text-right">{d.doses ?? '—'}</td>
                  <td className="td text-right">{billions(d.remainderBillion)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        <p className="text-sm">
          <span className="font-medium">Breeding soundness: </span>
          {r.breedingSoundness === null && 'not applicable (not one of two ejaculates collected about an hour apart).'}
          {r.breedingSoundness?.role === 'first' && `first of two ejaculates; the check applies to the second, collected ${when(r.breedingSoundness.secondCollectedAt)}.`}
          {r.breedingSoundness?.role === 'second' &&
            `second of two ejaculates (${fmt(r.breedingSoundness.gapMinutes, 0)} min after the first): PMMN ${billions(r.breedingSoundness.pmmnBillion)} against a threshold of ${billions(r.breedingSoundness.thresholdBillion)} — ${BSE_STATUS_LABELS[r.breedingSoundness.status]}.`}
        </p>
      </Section>

      <Section id={id('morphology')} title="Morphology">
        {!m ? (
          <p className="text-sm text-ink-soft">No read has been submitted yet: the morphology appears once it is.</p>
        ) : (
          <>
            <p className="text-sm text-ink-soft">
              {r.basis === 'first-unchecked'
                ? 'From the first read, not yet checked by a second reader (preview only: a report is signed from the settled read).'
                : sourceLine({ morphology: m, settings: r.settings })}
            </p>
            <dl className="grid gap-3 sm:grid-cols-3">
              <div>
                <dt className="text-sm text-ink-soft">Morphologically normal</dt>
                <dd className="text-2xl font-semibold" data-testid="report-pct-normal">{pct(m.pctNormal)}</dd>
                <dd className="text-sm">{m.normalInterval ? `95 % interval ${fmt(m.normalInterval.lowerPct, 1)}–${fmt(m.normalInterval.upperPct, 1)} % (Wilson)` : 'no cells counted'}</dd>
              </div>
              <div>
                <dt className="text-sm text-ink-soft">Abnormal</dt>
                <dd className="text-2xl font-semibold">{pct(m.pctAbnormal)}</dd>
                <dd className="text-sm">{m.abnormalCount} of {m.cellsCounted} cells</dd>
              </div>
              <div>
                <dt className="text-sm text-ink-soft">Sperm cells counted</dt>
                <dd className="text-2xl font-semibold">{m.cellsCounted}</dd>
                <dd className="text-sm">target {m.target} — {m.targetReached ? 'reached' : `${m.target - m.cellsCounted} short`}</dd>
              </div>
            </dl>
            <table aria-label={CELLS_VIEW_LABEL}>
              <caption className="pb-1 text-left text-sm font-medium">{CELLS_VIEW_LABEL}</caption>
              <thead>
                <tr><th className="th">Class</th><th className="th">Group</th><th className="th text-right">Cells</th><th className="th text-right">% of cells</th><th className="th w-1/4"><span className="sr-only">Bar</span></th></tr>
              </thead>
              <tbody>
                {m.perClass.map((c) => (
                  <tr key={c.key}>
                    <td className="td">{c.name}</td>
                    <td className="td">{GROUP_LABELS[c.group]}</td>
                    <td className="td text-right">{c.count}</td>
                    <td className="td text-right">{pct(c.pct)}</td>
                    <td className="td" aria-hidden="true">
                      <span className={`block h-2 rounded ${c.group === 'normal' ? 'bg-ok' : 'bg-brand'}`} style={{ width: `${((c.pct ?? 0) / maxPct) * 100}%` }} />
                    </td>
                  </tr>
                ))}
                <tr className="font-medium"><td className="td">Sperm cells counted</td><td className="td" /><td className="td text-right">{m.cellsCounted}</td><td className="td text-right">{m.cellsCounted ? '100.0 %' : '—'}</td><td className="td" /></tr>
              </tbody>
            </table>
            <div className="grid gap-4 md:grid-cols-2">
              <table aria-label={DEFECT_FREQUENCY_LABEL}>
                <caption className="pb-1 text-left text-sm font-medium">{DEFECT_FREQUENCY_LABEL}</caption>
                <thead><tr><th className="th">Defect</th><th className="th text-right">Cells with it</th><th className="th text-right">% of cells</th></tr></thead>
                <tbody>
                  {m.defectFrequencies.perClass.map((d) => (
                    <tr key={d.key}><td className="td">{d.name}</td><td className="td text-right">{d.cellsWithDefect}</td><td className="td text-right">{pct(d.pctOfCells)}</td></tr>
                  ))}
                  <tr className="font-medium"><td className="td">Defects seen in all</td><td className="td text-right">{m.defectFrequencies.totalDefects}</td><td className="td text-right">{pct(m.defectFrequencies.sumPct)}</td></tr>
                </tbody>
              </table>
              <div className="space-y-3">
                <table aria-label="By group">
                  <caption className="pb-1 text-left text-sm font-medium">By group</caption>
                  <thead><tr><th className="th">Group</th><th className="th text-right">Cells</th><th className="th text-right">% of cells</th></tr></thead>
                  <tbody>
                    {m.perGroup.map((g) => (
                      <tr key={g.group}><td className="td">{GROUP_LABELS[g.group]}</td><td className="td text-right">{g.count}</td><td className="td text-right">{pct(g.pct)}</td></tr>
                    ))}
                  </tbody>
                </table>
                <table aria-label="Other cells, counted apart">
                  <caption className="pb-1 text-left text-sm font-medium">Other cells, counted apart (in no %)</caption>
                  <tbody>
                    {m.nonSperm.length === 0 && <tr><td className="td">none in this class set</td></tr>}
                    {m.nonSperm.map((c) => (
                      <tr key={c.key}><td className="td">{c.name}</td><td className="td text-right">{c.count}</td></tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </div>
          </>
        )}
      </Section>

      {r.agreement && (
        <Section id={id('agreement')} title="Agreement between the two reads">
          <dl className="grid grid-cols-[12rem_1fr] gap-x-3 gap-y-1 text-sm">
            <KV k="Cohen’s kappa">{r.agreement.kappa === null ? 'not defined (one class only)' : `${fmt(r.agreement.kappa, 2)} (${KAPPA_BAND_LABELS[r.agreement.band!]}, Landis & Koch)`}</KV>
            <KV k="Observed agreement">{`${fmt(r.agreement.observedAgreement * 100, 1)} % of ${r.agreement.pairs} paired cells`}</KV>
            <KV k="Marked by one reader">{`first only ${r.agreement.onlyFirst}, second only ${r.agreement.onlySecond}`}</KV>
            <KV k="% normal, first read">{`${pct(r.agreement.firstPctNormal)} of ${r.agreement.firstCellsCounted} cells`}</KV>
            <KV k="% normal, second read">{`${pct(r.agreement.secondPctNormal)} of ${r.agreement.secondCellsCounted} cells`}</KV>
            <KV k="Difference">
              {`${fmt(r.agreement.acceptableDifference.difference, 1)} points; acceptable up to ${fmt(r.agreement.acceptableDifference.limit, 1)} — ${r.agreement.acceptableDifference.differ ? 'the reads differ more than chance allows' : 'within what chance allows'}`}
            </KV>
          </dl>
        </Section>
      )}

      <Section id={id('events')} title="Health events whose window covers this collection">
        {r.healthEvents.length === 0 ? (
          <p className="text-sm text-ink-soft">None recorded.</p>
        ) : (
          <table aria-label="Health events">
            <thead><tr><th className="th">Event</th><th className="th">Dates</th><th className="th text-right">Day of window</th><th className="th text-right">Window clears on</th></tr></thead>
            <tbody>
              {r.healthEvents.map((e, i) => (
                <tr key={i}>
                  <td className="td">{e.kind}{e.description && <span className="block text-xs text-ink-soft">{e.description}</span>}</td>
                  <td className="td">{e.endedOn && e.endedOn !== e.startedOn ? `${fmtDate(e.startedOn)} – ${fmtDate(e.endedOn)}` : fmtDate(e.startedOn)}</td>
                  <td className="td text-right">day {e.dayOfWindow} of {e.windowDays}</td>
                  <td className="td text-right">{fmtDate(e.windowClearsOn)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        <p className="text-xs text-ink-faint">
          Window: {r.settings.window.spermatogenesisDays} days of spermatogenesis plus {r.settings.window.epididymalTransitDays} days of epididymal transit (lab settings).
        </p>
      </Section>

      <Section id={id('vet')} title="Veterinarian’s remarks and interpretation">
        <p className="text-sm font-medium">Remarks</p>
        <p className="whitespace-pre-wrap text-sm">{r.veterinarian.remarks ?? '—'}</p>
        <p className="text-sm font-medium">Interpretation</p>
        <p className="whitespace-pre-wrap text-sm">{r.veterinarian.interpretation ?? '—'}</p>
      </Section>

      <Section id={id('people')} title="Read, checked and signed">
        <dl className="grid grid-cols-[9rem_1fr] gap-x-3 gap-y-1 text-sm">
          <KV k="Read by">{person(r.people.readBy)}</KV>
          <KV k="Checked by">{r.people.checkedBy ? person(r.people.checkedBy) : r.basis === 'single' ? 'no second read (the lab allows single-read reports)' : '—'}</KV>
          {r.people.settledBy && <KV k="Settled by">{person(r.people.settledBy)}</KV>}
          <KV k="Signed by">{r.people.signedBy ? `${person(r.people.signedBy)}, ${when(r.people.signedAt!)}` : 'not signed yet'}</KV>
        </dl>
      </Section>

      <footer className="space-y-1 border-t border-line pt-3 text-xs text-ink-soft">
        {r.cautions.map((c) => (
          <p key={c.title}><span className="font-medium">{c.title}: </span>{c.text}</p>
        ))}
      </footer>
    </article>
  );
}
