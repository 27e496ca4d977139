// Why a search gave no candidates although it ran to the end, in a technician's words. The
// detector records its reason in params (lib/candidates/detect.ts: `skipped`); the gallery and
// the scoring canvas show this text instead of "0 candidates", so an empty image is not read as
// an image without cells. Safe for the browser and the server (no imports).

type Params = { skipped?: unknown; micronsPerPixel?: unknown; scaleSource?: unknown; found?: unknown; maxCandidates?: unknown };

/** The words for a done search that gave no candidates on purpose; null for any other result. */
export function skippedText(params: unknown): string | null {
  if (!params || typeof params !== 'object') return null;
  const p = params as Params;
  if (typeof p.skipped !== 'string') return null;
  const mpp = typeof p.micronsPerPixel === 'number' ? p.micronsPerPixel : null;
  const scale = mpp === null ? 'this scale' : `this scale (${mpp} µm per pixel${p.scaleSource === 'lab setting' ? ', the lab’s setting for images without a scale' : ''})`;
  if (p.skipped.startsWith('scale too coarse')) return `Cells are not found automatically at ${scale}: mark them by hand.`;
  if (p.skipped.startsWith('implausible result')) {
    const found = typeof p.found === 'number' ? `${p.found} ` : '';
    const most = typeof p.maxCandidates === 'number' ? ` (${p.maxCandidates})` : '';
    return `The search found ${found}spots, more than this field could hold${most}: none is shown. Mark the cells by hand.`;
  }
  return `No cells are shown: ${p.skipped}. Mark them by hand.`;
}
