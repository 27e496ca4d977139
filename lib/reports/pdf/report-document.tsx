import type { ComponentProps, ReactNode } from 'react';
import { Document, Page, Path, Rect, Svg, Text, View } from '@react-pdf/renderer';
import { fmt, fmtDate, fmtDateTime } from '@/lib/format';
import { isTimeZone } from '@/lib/time/lab-time';
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
} from '../labels';
import type { ReportSnapshot } from '../snapshot';
import { ClassChart } from './class-chart';
import { qrPath } from './qr';
import { PAGE_PADDING, s } from './styles';

const A4_WIDTH = 595.28;
const CONTENT_WIDTH = A4_WIDTH - 2 * PAGE_PADDING.side;

/** "× 10⁹" with a real superscript (Inter's Latin file has no ⁹ glyph). */
function E9() {
  return (
    <Text>
      {' × 10'}
      <Text style={{ verticalAlign: 'super', fontSize: 5.5 }}>9</Text>
    </Text>
  );
}

function Billions({ value }: { value: number | null }) {
  if (value === null) return <Text>—</Text>;
  return (
    <Text>
      {fmt(value, 2)}
      <E9 />
    </Text>
  );
}

function KV({ k, children, keyWidth }: { k: string; children: ReactNode; keyWidth?: number }) {
  return (
    <View style={s.kv}>
      <Text style={keyWidth ? [s.kvKey, { width: keyWidth }] : s.kvKey}>{k}</Text>
      <Text style={s.kvValue}>{children}</Text>
    </View>
  );
}

type ViewStyle = ComponentProps<typeof View>['style'];

type Col = { width: number | string; align?: 'right' };

function Row({ cols, cells, style }: { cols: Col[]; cells: ReactNode[]; style?: ViewStyle }) {
  return (
    <View style={style ?? s.tr} wrap={false}>
      {cells.map((c, i) => (
        <View key={i} style={{ width: cols[i]!.width, paddingRight: 4 }}>
          <Text style={cols[i]!.align === 'right' ? s.num : {}}>{c}</Text>
        </View>
      ))}
    </View>
  );
}

function HeadRow({ cols, cells }: { cols: Col[]; cells: string[] }) {
  return (
    <View style={s.tr} wrap={false}>
      {cells.map((c, i) => (
        <View key={i} style={{ width: cols[i]!.width, paddingRight: 4 }}>
          <Text style={[s.th, cols[i]!.align === 'right' ? s.num : {}]}>{c}</Text>
        </View>
      ))}
    </View>
  );
}

function Section({ title, children, keep = false }: { title: string; children: ReactNode; keep?: boolean }) {
  if (keep) {
    return (
      <View style={s.section} wrap={false}>
        <Text style={s.h2}>{title}</Text>
        {children}
      </View>
    );
  }
  // The heading is a sibling of what went before, not the first child of a wrapper: react-pdf
  // only moves an element to the next page for minPresenceAhead when something precedes it.
  return (
    <>
      <Text style={[s.h2, s.section]} minPresenceAhead={60}>
        {title}
      </Text>
      <View>{children}</View>
    </>
  );
}

const pctText = (v: number | null, digits = 1) => (v === null ? '—' : `${fmt(v, digits)} %`);
const person = (p: { name: string; qualifications: string | null } | null) => (p ? (p.qualifications ? `${p.name}, ${p.qualifications}` : p.name) : '—');

export interface ReportDocumentProps {
  snapshot: ReportSnapshot;
  /** The public verification page for this report's code. */
  verifyUrl: string;
}

/** The signed report of one collection as a PDF document (react-pdf). */
export function ReportDocument({ snapshot: r, verifyUrl }: ReportDocumentProps) {
  const knownZone = isTimeZone(r.settings.timeZone);
  const tz = knownZone ? r.settings.timeZone : 'UTC';
  const when = (iso: string) => fmtDateTime(iso, tz);
  const day = (isoDay: string) => fmtDate(isoDay);
  const m = r.morphology;
  const v = r.semen;
  const qr = qrPath(verifyUrl);
  // "reports.example/verify": where a person types the code.
  const verifyPage = verifyUrl.slice(0, verifyUrl.lastIndexOf('/')).replace(/^https?:\/\//, '');
  const superseded = supersededLine(r.report);
  const collectedDay = fmtDate(r.collection.collectedAt, tz);
  const decisions = r.cautions.find((c) => c.title === 'Decisions') ?? r.cautions[r.cautions.length - 1]!;
  const otherCautions = r.cautions.filter((c) => c !== decisions);

  const semenCols: Col[] = [{ width: '34%' }, { width: '22%', align: 'right' }, { width: '44%' }];
  const doseCols: Col[] = [{ width: '20%' }, { width: '38%' }, { width: '14%', align: 'right' }, { width: '28%', align: 'right' }];
  const classCols: Col[] = [{ width: '52%' }, { width: '22%' }, { width: '12%', align: 'right' }, { width: '14%', align: 'right' }];
  const groupCols: Col[] = [{ width: '50%' }, { width: '25%', align: 'right' }, { width: '25%', align: 'right' }];
  const defectCols: Col[] = [{ width: '62%' }, { width: '19%', align: 'right' }, { width: '19%', align: 'right' }];
  const eventCols: Col[] = [{ width: '30%' }, { width: '24%' }, { width: '18%', align: 'right' }, { width: '28%', align: 'right' }];

  return (
    <Document
      title={`${REPORT_TITLE}: ${r.stallion.name}, ${collectedDay} (version ${r.report.version})`}
      author={r.lab.name}
      subject={`Verification code ${r.report.verificationCode}`}
      creator="Fieldmark"
      producer="Fieldmark"
      language="en-GB"
      // The signing instant, not the render time: the same snapshot gives the same document.
      creationDate={new Date(r.people.signedAt)}
      modificationDate={new Date(r.people.signedAt)}
    >
      <Page size="A4" style={s.page}>
        <Text
          style={s.runningHead}
          fixed
          render={({ pageNumber }) =>
            pageNumber > 1 ? `${r.stallion.name} · collected ${collectedDay} · ${REPORT_TITLE.toLowerCase()}, version ${r.report.version} · ${r.report.verificationCode}` : ''
          }
        />

        {/* Header */}
        <View style={s.header}>
          <View style={{ flex: 1, paddingRight: 12 }}>
            <Text style={s.labName}>{r.lab.name}</Text>
            {r.lab.address && <Text style={s.labAddress}>{r.lab.address}</Text>}
            <Text style={s.title}>{REPORT_TITLE}</Text>
            <Text style={s.subtitle}>
              {r.stallion.name} — collected {when(r.collection.collectedAt)}
            </Text>
            <Text style={s.versionLine}>{versionLine(r.report)}</Text>
            {superseded && <Text style={s.superseded}>{superseded}</Text>}
          </View>
          <View style={s.qrBox}>
            <Svg width={72} height={72} viewBox={`0 0 ${qr.size} ${qr.size}`}>
              <Rect x={0} y={0} width={qr.size} height={qr.size} fill="#FFFFFF" />
              <Path d={qr.d} fill="#000000" />
            </Svg>
            <Text style={s.qrCode}>{r.report.verificationCode}</Text>
            <Text style={s.qrHint}>Scan to check this report, or enter the code at {verifyPage}</Text>
          </View>
        </View>

        {/* Stallion and collection */}
        <View style={s.columns}>
          <View style={s.column}>
            <Text style={s.h3}>Stallion</Text>
            <KV k="Name">{r.stallion.name}</KV>
            <KV k="Breed">{r.stallion.breed ?? '—'}</KV>
            <KV k="Registration">{r.stallion.registration ?? '—'}</KV>
            <KV k="Foaled">{r.stallion.foalingYear ?? '—'}</KV>
            <KV k="Owner">{r.stallion.owner?.name ?? '—'}</KV>
          </View>
          <View style={s.column}>
            <Text style={s.h3}>Collection</Text>
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
          </View>
        </View>
        {!knownZone && <Text style={s.note}>Times are shown in UTC: the lab’s time zone {r.settings.timeZone} is unknown to this system.</Text>}
        {r.collection.notes && <Text style={[s.note, { marginTop: 3 }]}>Notes: {r.collection.notes}</Text>}

        {/* Semen parameters and arithmetic */}
        <Section title="Semen parameters and arithmetic" keep>
          <View style={s.table}>
            <HeadRow cols={semenCols} cells={['Parameter', 'Value', 'How']} />
            <Row cols={semenCols} cells={['Gel-free volume', v.volumeMl === null ? '—' : `${fmt(v.volumeMl, 1)} mL`, 'measured']} />
            <Row
              cols={semenCols}
              cells={[
                'Concentration',
                v.concentrationMillionPerMl === null ? '—' : <Text key="v">{fmt(v.concentrationMillionPerMl, 0)} × 10<Text style={{ verticalAlign: 'super', fontSize: 5.5 }}>6</Text>/mL</Text>,
                v.concentrationMethod === 'chamber' ? 'counting chamber, two counts' : 'entered',
              ]}
            />
            <Row cols={semenCols} cells={['Total motility', pctText(v.totalMotilityPct, 0), 'assessed']} />
            <Row cols={semenCols} cells={['Progressive motility', pctText(v.progressiveMotilityPct, 0), 'assessed']} />
            <Row cols={semenCols} cells={['Total sperm', <Billions key="v" value={v.totalSpermBillion} />, 'volume × concentration']} />
            <Row cols={semenCols} cells={['Total motile sperm', <Billions key="v" value={v.totalMotileBillion} />, 'total × % motile']} />
            <Row cols={semenCols} cells={['Progressively motile sperm (PMS)', <Billions key="v" value={v.progressivelyMotileBillion} />, 'total × % progressive']} />
            <Row
              style={s.trTotal}
              cols={semenCols}
              cells={['Progressively motile, morphologically normal (PMMN)', <Billions key="v" value={v.pmmnBillion} />, `PMS × % normal (${pctText(v.normalPctUsed)})`]}
            />
          </View>

          <Text style={s.h3}>Insemination doses at this lab’s dose sizes</Text>
          <View style={s.table}>
            <HeadRow cols={doseCols} cells={['Dose', 'Size', 'Doses', 'Left over']} />
            {v.doses.map((d) => (
              <Row
                key={d.kind}
                cols={doseCols}
                cells={[
                  DOSE_LABELS[d.kind],
                  <Text key="size">
                    {fmt(d.sizeBillion, 2)}
                    <E9 /> {BASIS_LABELS[d.basis]}
                  </Text>,
                  d.doses === null ? '—' : String(d.doses),
                  <Billions key="v" value={d.remainderBillion} />,
                ]}
              />
            ))}
          </View>

          <Text style={s.h3}>Breeding soundness</Text>
          {r.breedingSoundness === null && <Text style={s.note}>Not applicable: this collection is not one of two ejaculates collected about an hour apart.</Text>}
          {r.breedingSoundness?.role === 'first' && (
            <Text>
              First of two ejaculates: the check applies to the second, collected {when(r.breedingSoundness.secondCollectedAt)} ({fmt(r.breedingSoundness.gapMinutes, 0)} min later).
            </Text>
          )}
          {r.breedingSoundness?.role === 'second' && (
            <Text>
              Second of two ejaculates ({fmt(r.breedingSoundness.gapMinutes, 0)} min after the first, collected {when(r.breedingSoundness.firstCollectedAt)}): PMMN{' '}
              <Billions key="pmmn" value={r.breedingSoundness.pmmnBillion} /> against a threshold of <Billions key="threshold" value={r.breedingSoundness.thresholdBillion} /> —{' '}
              <Text style={{ fontWeight: 700 }}>{BSE_STATUS_LABELS[r.breedingSoundness.status]}</Text>.
            </Text>
          )}
        </Section>

        {/* Morphology */}
        <Section title="Morphology">
          <Text style={[s.note, s.para]}>{sourceLine(r)}</Text>
          <View style={s.headline} wrap={false}>
            <View style={{ flex: 1.3 }}>
              <Text style={s.headlineLabel}>Morphologically normal</Text>
              <Text style={s.headlineFigure}>{pctText(m.pctNormal)}</Text>
              <Text>
                {m.normalInterval
                  ? `95 % interval ${fmt(m.normalInterval.lowerPct, 1)}–${fmt(m.normalInterval.upperPct, 1)} % (Wilson)`
                  : 'no cells counted'}
              </Text>
            </View>
            <View style={{ flex: 1 }}>
              <Text style={s.headlineLabel}>Abnormal</Text>
              <Text style={s.headlineFigure}>{pctText(m.pctAbnormal)}</Text>
              <Text>
                {m.abnormalCount} of {m.cellsCounted} cells
              </Text>
            </View>
            <View style={{ flex: 1.2 }}>
              <Text style={s.headlineLabel}>Sperm cells counted</Text>
              <Text style={s.headlineFigure}>{m.cellsCounted}</Text>
              <Text>
                target {m.target} — {m.targetReached ? 'reached' : `${m.target - m.cellsCounted} short`}
              </Text>
            </View>
          </View>

          <View wrap={false}>
            <Text style={s.h3}>Class breakdown, % of sperm cells</Text>
            <ClassChart morphology={m} width={CONTENT_WIDTH} />
            <Text style={s.note}>The line with end marks across the Normal bar is the 95 % interval on % normal (Wilson).</Text>
          </View>

          <Text style={s.h3}>{CELLS_VIEW_LABEL}</Text>
          <View style={s.table}>
            <HeadRow cols={classCols} cells={['Class', 'Group', 'Cells', '% of cells']} />
            {m.perClass.map((c) => (
              <Row key={c.key} cols={classCols} cells={[c.name, GROUP_LABELS[c.group], String(c.count), pctText(c.pct)]} />
            ))}
            <Row style={s.trTotal} cols={classCols} cells={['Sperm cells counted', '', String(m.cellsCounted), m.cellsCounted ? '100.0 %' : '—']} />
          </View>

          <View style={[s.columns, { marginTop: 6 }]}>
            <View style={{ flex: 1.25 }} wrap={false}>
              <Text style={s.h3}>{DEFECT_FREQUENCY_LABEL}</Text>
              <View style={s.table}>
                <HeadRow cols={defectCols} cells={['Defect', 'Cells with it', '% of cells']} />
                {m.defectFrequencies.perClass.map((d) => (
                  <Row key={d.key} cols={defectCols} cells={[d.name, String(d.cellsWithDefect), pctText(d.pctOfCells)]} />
                ))}
                <Row style={s.trTotal} cols={defectCols} cells={['Defects seen in all', String(m.defectFrequencies.totalDefects), pctText(m.defectFrequencies.sumPct)]} />
              </View>
            </View>
            <View style={s.column} wrap={false}>
              <Text style={s.h3}>By group</Text>
              <View style={s.table}>
                <HeadRow cols={groupCols} cells={['Group', 'Cells', '% of cells']} />
                {m.perGroup.map((g) => (
                  <Row key={g.group} cols={groupCols} cells={[GROUP_LABELS[g.group], String(g.count), pctText(g.pct)]} />
                ))}
              </View>
              <Text style={s.h3}>Other cells, counted apart (in no %)</Text>
              <View style={s.table}>
                <HeadRow cols={groupCols} cells={['Cell', 'Counted', '']} />
                {m.nonSperm.length === 0 && <Row cols={groupCols} cells={['none in this class set', '', '']} />}
                {m.nonSperm.map((c) => (
                  <Row key={c.key} cols={groupCols} cells={[c.name, String(c.count), '']} />
                ))}
              </View>
            </View>
          </View>
        </Section>

        {/* Agreement */}
        {r.agreement && (
          <Section title="Agreement between the two reads" keep>
            <View style={s.columns}>
              <View style={s.column}>
                <KV keyWidth={104} k="Cohen's kappa">
                  {r.agreement.kappa === null ? 'not defined (one class only)' : `${fmt(r.agreement.kappa, 2)} (${KAPPA_BAND_LABELS[r.agreement.band!]}, Landis & Koch)`}
                </KV>
                <KV keyWidth={104} k="Observed agreement">{`${fmt(r.agreement.observedAgreement * 100, 1)} % of ${r.agreement.pairs} paired cells`}</KV>
                <KV keyWidth={104} k="Marked by one reader">{`first only ${r.agreement.onlyFirst}, second only ${r.agreement.onlySecond}`}</KV>
              </View>
              <View style={s.column}>
                <KV keyWidth={104} k="% normal, first read">{`${pctText(r.agreement.firstPctNormal)} of ${r.agreement.firstCellsCounted} cells`}</KV>
                <KV keyWidth={104} k="% normal, second read">{`${pctText(r.agreement.secondPctNormal)} of ${r.agreement.secondCellsCounted} cells`}</KV>
                <KV keyWidth={104} k="Difference">
                  {`${fmt(r.agreement.acceptableDifference.difference, 1)} points; acceptable up to ${fmt(r.agreement.acceptableDifference.limit, 1)} — ${r.agreement.acceptableDifference.differ ? 'the reads differ more than chance allows' : 'within what chance allows'}`}
                </KV>
              </View>
            </View>
          </Section>
        )}

        {/* Health events */}
        <Section title="Health events whose window covers this collection">
          {r.healthEvents.length === 0 ? (
            <Text style={s.note}>None recorded.</Text>
          ) : (
            <View style={s.table}>
              <HeadRow cols={eventCols} cells={['Event', 'Dates', 'Day of window', 'Window clears on']} />
              {r.healthEvents.map((e, i) => (
                <View key={i} wrap={false}>
                  <Row
                    cols={eventCols}
                    cells={[
                      e.kind,
                      e.endedOn && e.endedOn !== e.startedOn ? `${day(e.startedOn)} – ${day(e.endedOn)}` : day(e.startedOn),
                      `day ${e.dayOfWindow} of ${e.windowDays}`,
                      day(e.windowClearsOn),
                    ]}
                  />
                  {e.description && <Text style={[s.note, { paddingVertical: 2 }]}>{e.description}</Text>}
                </View>
              ))}
            </View>
          )}
          <Text style={[s.note, { marginTop: 2 }]}>
            Window: {r.settings.window.spermatogenesisDays} days of spermatogenesis plus {r.settings.window.epididymalTransitDays} days of epididymal transit (lab settings).
          </Text>
        </Section>

        {/* Veterinarian */}
        <Section title="Veterinarian's remarks and interpretation">
          <Text style={s.h3}>Remarks</Text>
          <Text style={s.para}>{r.veterinarian.remarks ?? '—'}</Text>
          <Text style={s.h3}>Interpretation</Text>
          <Text style={s.para}>{r.veterinarian.interpretation ?? '—'}</Text>
        </Section>

        {/* Signature */}
        <View style={s.section} wrap={false}>
          <Text style={s.h2}>Sign-off</Text>
          <View style={s.signature}>
            <View style={s.signatureCell}>
              <Text style={s.headlineLabel}>Read by</Text>
              <Text style={s.signatureName}>{person(r.people.readBy)}</Text>
            </View>
            <View style={s.signatureCell}>
              <Text style={s.headlineLabel}>Checked by (second read)</Text>
              <Text style={s.signatureName}>{person(r.people.checkedBy)}</Text>
              {r.people.settledBy && <Text style={s.note}>settled by {person(r.people.settledBy)}</Text>}
            </View>
            <View style={s.signatureCell}>
              <Text style={s.headlineLabel}>Signed by</Text>
              <Text style={s.signatureName}>{person(r.people.signedBy)}</Text>
              <Text>{when(r.people.signedAt)}</Text>
            </View>
          </View>
          <Text style={[s.versionLine, { marginTop: 6 }]}>{versionLine(r.report)}</Text>
          {r.report.supersedes && (
            <Text style={s.note}>
              Amended by {r.report.supersedes.by} on {when(r.report.supersedes.at)}. Version {r.report.supersedes.version} remains on record.
            </Text>
          )}
          {superseded && <Text style={s.superseded}>{superseded}</Text>}
          <Text style={[s.note, { marginTop: 3 }]}>
            Signed electronically in Fieldmark. Check that this report is genuine and current at {verifyUrl}
          </Text>
          <Text style={[s.note, { marginTop: 3 }]}>
            Lab settings used: class set “{r.settings.classSet.name}”, target {r.settings.targetCells} cells, breeding-soundness threshold {fmt(r.settings.bseThresholdBillion, 2)}
            <E9 /> PMMN, dose sizes fresh {fmt(r.settings.doses.fresh.sizeBillion, 2)}, cooled {fmt(r.settings.doses.cooled.sizeBillion, 2)}, frozen{' '}
            {fmt(r.settings.doses.frozen.sizeBillion, 2)}
            <E9 />, times on the clock of {r.settings.timeZone}.
          </Text>
        </View>

        {/* Cautions */}
        <View style={s.section} wrap={false}>
          <Text style={s.h2}>Cautions</Text>
          <View style={s.cautions}>
            {otherCautions.map((c) => (
              <Text key={c.title} style={s.caution}>
                <Text style={{ fontWeight: 600 }}>{c.title}. </Text>
                {c.text}
              </Text>
            ))}
          </View>
        </View>

        {/* Footer on every page */}
        <View style={s.footer} fixed>
          <Text style={s.footerText}>
            <Text style={{ fontWeight: 600 }}>{decisions.text}</Text> Collecting stallions, semen, fixatives and liquid nitrogen carry risks to people: see the cautions at the end of this
            report.
          </Text>
          <View style={s.footerRow}>
            <Text style={s.footerText}>
              {r.stallion.name} · {collectedDay} · version {r.report.version} · verify: <Text style={s.footerStrong}>{r.report.verificationCode}</Text>
            </Text>
            <Text style={s.footerStrong} render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
          </View>
        </View>
      </Page>
    </Document>
  );
}
