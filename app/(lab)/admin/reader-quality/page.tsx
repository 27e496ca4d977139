import { getReaderQuality } from '@/db/queries/reader-quality';
import { getLabSettings } from '@/db/queries/settings';
import { zodIssues } from '@/lib/api/handler';
import { requirePageUser } from '@/lib/auth/session';
import { labDayKey } from '@/lib/time/lab-time';
import { qualityPeriod, readerQualityQuery } from '@/lib/validations/reader-quality';
import { QualityView } from './_components/quality-view';

export const metadata = { title: 'Reader quality' };

export default async function ReaderQualityPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const user = await requirePageUser(['lab_manager']);
  const raw = await searchParams;
  const settings = await getLabSettings();
  const parsed = readerQualityQuery.safeParse({ from: typeof raw.from === 'string' && raw.from ? raw.from : undefined, to: typeof raw.to === 'string' && raw.to ? raw.to : undefined });
  const problem = parsed.success ? null : zodIssues(parsed.error)[0]?.message ?? 'Check the dates.';
  const period = qualityPeriod(parsed.success ? parsed.data : {}, labDayKey(new Date(), settings.timeZone));
  const report = await getReaderQuality(user, period);
  return (
    <div className="space-y-4">
      <h1>Reader quality</h1>
      <p className="text-sm text-ink-soft">
        How each reader’s counts compare with the other reader’s on the same collections: every collection collected in the period whose first and second reads are
        both submitted, with its agreement figures as on its report (marks paired cell by cell; Cohen’s kappa over paired sperm cells; the two % normal values against
        the acceptable difference for duplicate counts, binomial 95 %). Each figure says how many collections it rests on.
      </p>
      <form method="get" className="card flex flex-wrap items-end gap-3" aria-label="Period">
        <div>
          <label htmlFor="from" className="label">From</label>
          <input id="from" name="from" type="date" className="input" defaultValue={period.from} aria-invalid={problem ? true : undefined} />
        </div>
        <div>
          <label htmlFor="to" className="label">To</label>
          <input id="to" name="to" type="date" className="input" defaultValue={period.to} aria-invalid={problem ? true : undefined} />
        </div>
        <button type="submit" className="btn">Show</button>
        {problem && <p role="alert" className="field-error basis-full">{problem} Showing the last twelve months instead.</p>}
      </form>
      <QualityView report={report} timeZone={settings.timeZone} />
      <p className="text-xs text-ink-faint">
        A reader’s figures depend on whom they were compared with and on the slides they read; small numbers of collections say little. Use them to talk about
        counting, not to rank people.
      </p>
    </div>
  );
}
