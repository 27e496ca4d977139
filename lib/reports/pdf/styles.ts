import { StyleSheet } from '@react-pdf/renderer';
import type { SpermGroup } from '../snapshot';
import { PDF_FONT_FAMILY } from './fonts';

/*
 * Print colours: near-black text on white, grey rules, one accent. The bars take Okabe & Ito's
 * colour-universal-design palette by group (told apart with every common colour-vision
 * deficiency), each bar outlined in ink and labelled with its class and value, so the chart
 * also reads in greyscale. The app's own class colours are not used: they are chosen for marks on
 * a dark nigrosin background and include white.
 */
export const INK = '#1A1A1A';
export const MUTED = '#555555';
export const RULE = '#B8B8B8';
export const PANEL = '#F2F2F2';
export const ACCENT = '#0072B2';

export const GROUP_COLOURS: Record<SpermGroup, string> = {
  normal: '#009E73',
  head: '#E69F00',
  midpiece: '#CC79A7',
  droplet: '#D55E00',
  tail: '#0072B2',
  other: '#56B4E9',
};

export const PAGE_PADDING = { top: 34, side: 40, bottom: 92 };
/** A4 height in points. The footer is placed from the top: react-pdf drops a page-number text anchored with `bottom`. */
export const PAGE_HEIGHT = 841.89;
const FOOTER_TOP = PAGE_HEIGHT - 80;

export const s = StyleSheet.create({
  page: {
    fontFamily: PDF_FONT_FAMILY,
    fontSize: 8.5,
    lineHeight: 1.35,
    color: INK,
    // Inter's contextual alternates change nothing a report needs and cost about a tenth of the render time.
    fontFeatureSettings: { calt: false },
    paddingTop: PAGE_PADDING.top,
    paddingHorizontal: PAGE_PADDING.side,
    paddingBottom: PAGE_PADDING.bottom,
  },
  runningHead: { position: 'absolute', top: 16, left: PAGE_PADDING.side, right: PAGE_PADDING.side, fontSize: 7, color: MUTED },
  header: { flexDirection: 'row', justifyContent: 'space-between', borderBottomWidth: 1.5, borderBottomColor: ACCENT, paddingBottom: 8, marginBottom: 10 },
  labName: { fontSize: 10, lineHeight: 1.3, fontWeight: 600, color: ACCENT },
  labAddress: { fontSize: 7.5, color: MUTED },
  title: { fontSize: 15, lineHeight: 1.25, fontWeight: 700, marginTop: 6 },
  versionLine: { fontSize: 8.5, fontWeight: 600, marginTop: 3 },
  subtitle: { fontSize: 10, lineHeight: 1.3, fontWeight: 600, marginTop: 2 },
  superseded: { fontSize: 9, fontWeight: 700, color: '#B00000', marginTop: 3 },
  qrBox: { width: 124, alignItems: 'center' },
  qrCode: { fontSize: 7.5, lineHeight: 1.3, fontWeight: 600, marginTop: 2 },
  qrHint: { fontSize: 6.5, lineHeight: 1.25, color: MUTED, textAlign: 'center' },

  section: { marginTop: 10 },
  h2: { fontSize: 10.5, lineHeight: 1.3, fontWeight: 600, color: ACCENT, borderBottomWidth: 0.75, borderBottomColor: RULE, paddingBottom: 2, marginBottom: 5 },
  h3: { fontSize: 8.5, fontWeight: 600, marginTop: 6, marginBottom: 3 },
  note: { fontSize: 7.5, color: MUTED },
  para: { marginBottom: 4 },

  columns: { flexDirection: 'row', gap: 18 },
  column: { flex: 1 },
  kv: { flexDirection: 'row', paddingVertical: 1.2 },
  kvKey: { width: 92, color: MUTED },
  kvValue: { flex: 1, fontWeight: 600 },

  table: { borderTopWidth: 0.75, borderTopColor: RULE },
  tr: { flexDirection: 'row', borderBottomWidth: 0.5, borderBottomColor: RULE, paddingVertical: 1.5 },
  th: { fontWeight: 600, color: MUTED, fontSize: 7.5 },
  trTotal: { flexDirection: 'row', borderBottomWidth: 0.75, borderBottomColor: INK, paddingVertical: 1.5, fontWeight: 600 },
  num: { textAlign: 'right' },

  headline: { flexDirection: 'row', gap: 10, backgroundColor: PANEL, padding: 7, marginBottom: 6 },
  headlineFigure: { fontSize: 16, lineHeight: 1.25, fontWeight: 700 },
  headlineLabel: { fontSize: 7.5, color: MUTED },

  signature: { flexDirection: 'row', gap: 14, borderTopWidth: 0.75, borderTopColor: RULE, paddingTop: 6 },
  signatureCell: { flex: 1 },
  signatureName: { fontWeight: 600, fontSize: 9 },

  cautions: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between' },
  caution: { width: '48.5%', fontSize: 7.3, marginBottom: 4 },

  footer: { position: 'absolute', top: FOOTER_TOP, left: PAGE_PADDING.side, right: PAGE_PADDING.side, borderTopWidth: 0.75, borderTopColor: RULE, paddingTop: 4 },
  footerText: { fontSize: 6.6, lineHeight: 1.3, color: MUTED },
  footerRow: { flexDirection: 'row', justifyContent: 'space-between', marginTop: 3 },
  footerStrong: { fontSize: 7, fontWeight: 600, color: INK },
});
