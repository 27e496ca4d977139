// One call for an upload already on disk: checks, checksum and browser copies.
// The pixels are decoded once: making the display copy is the full-decode check
// (it fails on a truncated or damaged file), and the checksum streams the original
// bytes on the main thread while sharp decodes on its worker threads.
import { makeDerivatives, type Derivative, type DerivativeOptions, type Levels } from './derive';
import {
  checkHeader,
  decodeFailure,
  isDecodeError,
  sha256Of,
  type ImageInfo,
  type ImageInput,
  type ImageLimits,
  type InspectFailure,
} from './inspect';

export interface IngestSuccess {
  ok: true;
  info: ImageInfo & { sha256: string };
  display: Derivative;
  thumbnail: Derivative;
  /** Black and white points used when 16-bit samples were brought to 8 bits. */
  levels: Levels | null;
  sha256: string;
}

export type IngestResult = IngestSuccess | InspectFailure;

export type IngestOptions = Omit<DerivativeOptions, 'info' | 'maxPixels'>;

export async function ingestImage(
  input: ImageInput,
  limits: ImageLimits,
  opts: IngestOptions = {},
): Promise<IngestResult> {
  const header = await checkHeader(input, limits);
  if (!header.ok) return header;
  const { info } = header;

  const derived = makeDerivatives(input, { ...opts, info, maxPixels: limits.maxPixels }).then(
    (d) => ({ ok: true as const, d }),
    (err: unknown) => {
      if (!isDecodeError(err)) throw err;
      return decodeFailure(err, info.format, limits);
    },
  );
  const [result, sha256] = await Promise.all([derived, sha256Of(input)]);
  if (!result.ok) return result;
  return {
    ok: true,
    info: { ...info, sha256 },
    display: result.d.display,
    thumbnail: result.d.thumbnail,
    levels: result.d.levels,
    sha256,
  };
}
