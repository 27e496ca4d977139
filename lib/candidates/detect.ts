// Candidate cells on a field image: a point on each likely sperm head, where a reader
// would place the mark. Classical image analysis, every step a library call:
//   sharp  — orientation, a downscale so a head is ~WORK_HEAD_LENGTH_PX long, and the grey
//            level: the brightest channel of a colour image (HSV's value, see below);
//   OpenCV — background: median filter of a coarser copy, brought back to size;
//            polarity: on which side of the background the strong pixels lie (on a
//            quarter-size copy);
//            flattening: image / background (flat-field correction, so uneven
//            illumination divides out); Otsu threshold; morphological closing with a small disc
//            (fills vacuoles) and opening (drops tails and midpieces, thinner than its
//            disc; the erosions as one threshold of the distance transform, see below);
//            connected components by their outer contours; each component's moments
//            (area, centre, elongation) and distance transform (thickness).
// Components whose area, elongation and thickness fit a head at the image's scale become
// candidates, each with a score in [0, 1]. A larger component (a head with a thick midpiece
// still attached, heads touching) gives one candidate per head-thick core. Everything that
// decides the result is returned in `params`, so a run can be repeated.
import sharp from 'sharp';
import { stretchLevels, to8Bit } from '@/lib/images/derive';
import { loadOpenCv } from './opencv';

/** Stallion sperm head, length × width in µm (from memory; lib/synthetic/sperm.ts draws the same). */
export const HEAD_LENGTH_UM = 6;
export const HEAD_WIDTH_UM = 3;

/** The package doing the image analysis; a unit test checks it against the installed one. */
export const OPENCV_PACKAGE = '@techstark/opencv-js@4.12.0-release.1';
/**
 * v3: the threshold never falls inside the background's noise (Otsu's fell there on sparse
 * phase-contrast fields at 0.75 µm/px and coarser, giving thousands of candidates); no search
 * below MIN_HEAD_LENGTH_PX; no candidates beyond maxCandidates. Same candidates as v2 where
 * Otsu's threshold is above the floor (every field of the accuracy test).
 * v2 gives the same candidates as v1 wherever the two were compared (the accuracy fields, the
 * detection bench's 12-MP fields, 0.25–1 µm/px); it takes the same steps in fewer calls and
 * records erosionRadiusPx.
 */
export const METHOD = 'flatfield-otsu-opening-components v3';

export type Polarity = 'bright' | 'dark';

export interface DetectOptions {
  /** The image's scale; for an image without one, the lab's setting for unscaled images. */
  micronsPerPixel: number;
  /** Where the scale came from, recorded with the result. */
  scaleSource?: 'image' | 'lab setting';
  /** Use this polarity instead of detecting it. */
  polarity?: Polarity;
  /** Safety net handed to sharp (pixels). */
  maxPixels?: number;
}

export interface Candidate {
  /** Image pixels in the marks' frame (pixel i spans [i, i + 1]), orientation applied. */
  x: number;
  y: number;
  /** How head-like, 0–1. */
  score: number;
}

/** What every result records, whether cells were searched for or not. */
export interface BaseParams {
  library: string;
  sharp: string;
  micronsPerPixel: number;
  scaleSource: 'image' | 'lab setting';
  headLengthUm: number;
  headWidthUm: number;
  imageWidth: number;
  imageHeight: number;
  /** A head's length in the image's pixels, and the least with which cells are searched for. */
  headLengthPx: number;
  minHeadLengthPx: number;
  /** The most cells the field could hold (its area over a whole cell's footprint); more candidates are not shown. */
  maxCandidates: number;
  cellFootprintUm2: number;
  /** Set when no candidates are given: why, in a developer's words. */
  skipped?: string;
}

/** A result whose scale was too coarse to search at all: nothing but the base. */
export interface SkippedParams extends BaseParams {
  skipped: string;
}

export interface DetectParams extends BaseParams {
  opencv: string;
  /** Working copy: size, scale against the image, and sharp's resampling kernel. */
  workWidth: number;
  workHeight: number;
  workScale: number;
  resizeKernel: string;
  /** How the grey level was taken: the brightest channel of a colour image, or the one channel. */
  grey: 'max of R, G, B' | 'single channel';
  /** Median window in the coarse copy, which is backgroundShrink times smaller again. */
  backgroundWindowPx: number;
  backgroundShrink: number;
  polarity: Polarity;
  polarityDetected: boolean;
  /** Pixels beyond ±polaritySigmas × backgroundNoise of the background on each side, in a half-size copy. */
  polarityCounts: { bright: number; dark: number };
  polaritySigmas: number;
  /** Standard deviation of image / background in the half-size copy, after sigma clipping. */
  backgroundNoise: number;
  /** Flattened copy: ratioScale × image / (background + 1), inverted for dark cells. */
  ratioScale: number;
  /** Otsu's, raised to thresholdFloor (background + polaritySigmas × its noise) where it fell below it. */
  threshold: 'otsu, at least the noise floor';
  otsuValue: number;
  thresholdFloor: number;
  thresholdValue: number;
  closingKernelPx: number;
  openingRadiusPx: number;
  /**
   * The opening's erosion: pixels farther than this from the outside. Where it is
   * openingRadiusPx + 1, it is the closing's erosion too, and the mask it erodes is the dilated one.
   */
  erosionRadiusPx: number;
  /** Dilation steps of the opening, each by an octagon of radius 2 px. */
  openingDilateSteps: number;
  /** Component area: at least min; up to loneMax one head; up to max split into heads by their cores. */
  areaPx: { expected: number; min: number; loneMax: number; max: number };
  elongation: { expected: number; min: number; max: number };
  /** Half-thickness at a head's thickest point, and the thickness that marks a head inside a larger component. */
  coreHalfWidthPx: { min: number; max: number; split: number };
  coreJoinKernelPx: number;
  components: number;
  /** Components that gave more than one candidate. */
  split: number;
  /** Candidates the search gave; more than maxCandidates, and none are kept (skipped says so). */
  found: number;
}

export interface DetectResult {
  candidates: Candidate[];
  method: string;
  params: DetectParams | SkippedParams;
  ms: number;
}

/** True when the search was not run (scale too coarse): params hold only the base. */
export const searchSkipped = (params: DetectParams | SkippedParams): params is SkippedParams => !('polarity' in params);

/** A head about this many pixels long in the working copy: enough for its shape, cheap to analyse. */
export const WORK_HEAD_LENGTH_PX = 12;
/** Small heads are enlarged at most this much (finer morphology steps; beyond it the copy grows too big). */
const MAX_UPSCALE = 1.5;
/**
 * The shortest head searched for, in image pixels: the one the largest enlargement brings to
 * WORK_HEAD_LENGTH_PX (8 px, 0.75 µm/px). Shorter, every shape limit below works on fewer
 * pixels than it was set for, and heads cannot be told from debris (on synthetic fields at
 * 0.8 µm/px precision falls to 0.73–0.85, at 1 µm/px recall to 0.68–0.88; see
 * tests/unit/candidates/coarse-scale.test.ts): no candidates are given, with the reason.
 */
export const MIN_HEAD_LENGTH_PX = WORK_HEAD_LENGTH_PX / MAX_UPSCALE;
/** A whole stallion sperm cell, head to tail end, µm (common practice, rounded; lib/synthetic/sperm.ts draws the same). */
export const CELL_LENGTH_UM = 70;
/**
 * A cell lying on its own covers at least its length × a head's width; a field cannot hold
 * more cells than such strips tiling it. More candidates than that are not cells.
 */
const CELL_FOOTPRINT_UM2 = CELL_LENGTH_UM * HEAD_WIDTH_UM;
/** sharp's resampling kernel for the working copy: a linear kernel widened by the reduction averages grain away. */
const RESIZE_KERNEL = 'linear';
/** Background window, in head lengths: much larger than a head, smaller than lighting changes. */
const BACKGROUND_WINDOW_HEADS = 5;
/** The median runs on a copy this many times coarser again (its cost grows with the window). */
const BACKGROUND_SHRINK = 8;
/** How far from the background, in multiples of its noise, a pixel counts in the polarity vote. */
const POLARITY_SIGMAS = 5;
/** Opening disc diameter as a share of the head width: removes tails (~0.6 µm) and midpieces (~1 µm). */
const OPENING_SHARE_OF_WIDTH = 0.75;
/** Closing disc radius, µm: fills nuclear vacuoles (about 0.6–1 µm across) inside a head. The kernel is at least 3 px. */
const CLOSING_RADIUS_UM = 0.6;
/** Accepted area of one head, in expected head areas (an ellipse of HEAD_LENGTH × HEAD_WIDTH). */
const AREA_RANGE = [0.8, 2.6] as const;
const ELONGATION_RANGE = [1.25, 3.8] as const;
/** Larger components than this (in expected head areas) are clumps, not cells. */
const CLUSTER_AREA_MAX = 12;
/** Half-thickness at a head's thickest point (distance transform), as a share of head width. */
const CORE_RANGE = [0.45, 1.15] as const;
/** In a larger component, parts at least this thick (share of head width) are taken as heads. */
const SPLIT_CORE = 0.5;
/** Pieces of one core closer than this share of a head length are joined. */
const CORE_JOIN_SHARE = 0.35;

const odd = (n: number) => (Math.round(n) % 2 === 1 ? Math.round(n) : Math.round(n) + 1);
const round = (n: number, d = 2) => Math.round(n * 10 ** d) / 10 ** d;

/** Greyscale working copy at `scale`. 16-bit images are stretched to 8 bits (cameras fill few of their bits). */
async function orientedSize(input: Buffer | string, maxPixels: number | undefined) {
  const meta = await sharp(input, { limitInputPixels: maxPixels ?? true }).metadata();
  const swap = (meta.orientation ?? 1) >= 5;
  return { meta, width: swap ? meta.height! : meta.width!, height: swap ? meta.width! : meta.height! };
}

async function workingCopy(input: Buffer | string, scale: number, maxPixels: number | undefined, { meta, width, height }: Awaited<ReturnType<typeof orientedSize>>) {
  const limitInputPixels = maxPixels ?? true;
  const workWidth = Math.max(1, Math.round(width * scale));
  const workHeight = Math.max(1, Math.round(height * scale));
  const deep = meta.depth === 'ushort' || meta.depth === 'short';
  const pipeline = sharp(input, { limitInputPixels, failOn: 'truncated' });
  // Only when the file says so: rotate() costs a copy of the image even for orientation 1.
  if ((meta.orientation ?? 1) !== 1) pipeline.rotate();
  pipeline.resize(workWidth, workHeight, { fit: 'fill', kernel: RESIZE_KERNEL });
  let pixels: Uint8Array;
  let colour = false;
  if (deep) {
    const data = await pipeline.toColourspace('grey16').raw({ depth: 'ushort' }).toBuffer();
    const samples = data.byteOffset % 2 === 0 ? new Uint16Array(data.buffer, data.byteOffset, data.length / 2) : new Uint16Array(Uint8Array.from(data).buffer);
    pixels = to8Bit(samples, stretchLevels(samples));
  } else if ((meta.channels ?? 3) - (meta.hasAlpha ? 1 : 0) >= 3) {
    // Grey level: the brightest of the three channels. An eosin-stained head is pink, dim
    // in luminance (green carries most of it) but as bright as an unstained one in red; on a
    // grey phase-contrast field every channel is the same. Taken by libvips on the downscaled
    // copy: HSV's value is that maximum, so one channel leaves sharp, not three.
    pixels = await pipeline.removeAlpha().toColourspace('hsv').extractChannel(2).raw().toBuffer();
    colour = true;
  } else {
    pixels = await pipeline.toColourspace('b-w').raw().toBuffer();
  }
  if (pixels.length !== workWidth * workHeight) throw new Error('The working copy came out with an unexpected size.');
  return { width, height, workWidth, workHeight, pixels, colour };
}

/**
 * Runs `fn` with a `keep` that registers Mats and a `free` that deletes one early; every
 * Mat still registered is deleted at the end, whatever happens (OpenCV's memory is not
 * garbage-collected).
 */
function withMats<T>(fn: (keep: <M extends { delete(): void }>(m: M) => M, free: (m: { delete(): void }) => void) => T): T {
  const mats = new Set<{ delete(): void }>();
  let async = false;
  try {
    const out = fn(
      (m) => {
        mats.add(m);
        return m;
      },
      (m) => {
        if (mats.delete(m)) m.delete();
      },
    );
    if (out instanceof Promise) {
      async = true;
      return out.finally(() => {
        for (const m of mats) m.delete();
      }) as T;
    }
    return out;
  } finally {
    if (!async) for (const m of mats) m.delete();
  }
}

/**
 * Lets other work on this process run between steps: detection shares the process with
 * request handlers, and no step here should hold it for more than a few tens of ms.
 */
const breathe = () => new Promise<void>((resolve) => setImmediate(resolve));

export async function detectCandidates(input: Buffer | string, options: DetectOptions): Promise<DetectResult> {
  const t0 = performance.now();
  const mpp = options.micronsPerPixel;
  if (!(mpp > 0 && Number.isFinite(mpp))) throw new RangeError('micronsPerPixel must be a positive number.');
  const size = await orientedSize(input, options.maxPixels);
  const headLengthPx = HEAD_LENGTH_UM / mpp;
  const maxCandidates = Math.floor((size.width * size.height * mpp * mpp) / CELL_FOOTPRINT_UM2);
  const base: BaseParams = {
    library: OPENCV_PACKAGE,
    sharp: sharp.versions.sharp ?? 'unknown',
    micronsPerPixel: mpp,
    scaleSource: options.scaleSource ?? 'image',
    headLengthUm: HEAD_LENGTH_UM,
    headWidthUm: HEAD_WIDTH_UM,
    imageWidth: size.width,
    imageHeight: size.height,
    headLengthPx: round(headLengthPx),
    minHeadLengthPx: MIN_HEAD_LENGTH_PX,
    maxCandidates,
    cellFootprintUm2: CELL_FOOTPRINT_UM2,
  };
  if (headLengthPx < MIN_HEAD_LENGTH_PX) {
    const skipped = `scale too coarse: a head would be ${round(headLengthPx, 1)} px long; cell finding needs at least ${MIN_HEAD_LENGTH_PX}`;
    return { candidates: [], method: METHOD, params: { ...base, skipped }, ms: Math.round(performance.now() - t0) };
  }
  const scale = Math.min(MAX_UPSCALE, WORK_HEAD_LENGTH_PX / headLengthPx);
  const [{ cv }, work] = await Promise.all([loadOpenCv(), workingCopy(input, scale, options.maxPixels, size)]);
  const { workWidth: w, workHeight: h } = work;
  const sx = work.width / w; // exact per axis after rounding the working size
  const sy = work.height / h;
  const headL = (HEAD_LENGTH_UM / mpp) * scale;
  const headW = (HEAD_WIDTH_UM / mpp) * scale;
  const expectedArea = (Math.PI / 4) * headL * headW;
  const openingRadiusPx = round((headW * OPENING_SHARE_OF_WIDTH) / 2, 2);
  const dilateSteps = Math.max(1, Math.round(openingRadiusPx / 2));
  const closingKernelPx = Math.max(3, odd(2 * CLOSING_RADIUS_UM * (scale / mpp)));
  // The closing's erosion and the opening's in one (see below) where the working copy has its
  // usual head length, so an opening radius of 2.25 px (every scale of 0.75 µm/px or finer).
  const erodeOnce = closingKernelPx === 3 && openingRadiusPx === 2.25;
  const erosionRadiusPx = erodeOnce ? openingRadiusPx + 1 : openingRadiusPx;
  const backgroundWindowPx = Math.max(3, odd((BACKGROUND_WINDOW_HEADS * headL) / BACKGROUND_SHRINK));
  const coreJoinPx = Math.max(3, odd(headL * CORE_JOIN_SHARE));

  return withMats(async (keep, free) => {
    // The grey working copy (see workingCopy for how a colour image's grey is taken).
    const src = keep(new cv.Mat(h, w, cv.CV_8UC1));
    src.data.set(work.pixels);

    // A quarter-size copy for the polarity vote, by area averaging in two halvings (halving
    // an even size is OpenCV's quick path).
    const halfSize = new cv.Size(Math.max(1, Math.round(w / 2)), Math.max(1, Math.round(h / 2)));
    const quarterSize = new cv.Size(Math.max(1, Math.round(w / 4)), Math.max(1, Math.round(h / 4)));
    const half = keep(new cv.Mat());
    const quarter = keep(new cv.Mat());
    cv.resize(src, half, halfSize, 0, 0, cv.INTER_AREA);
    cv.resize(half, quarter, quarterSize, 0, 0, cv.INTER_AREA);
    free(half);

    // Background: median of a coarse copy (robust to the cells on it), brought back to size,
    // + 1 so nothing is divided by a black background (a vignetted corner).
    const coarse = keep(new cv.Mat());
    cv.resize(src, coarse, new cv.Size(Math.max(1, Math.round(w / BACKGROUND_SHRINK)), Math.max(1, Math.round(h / BACKGROUND_SHRINK))), 0, 0, cv.INTER_AREA);
    cv.medianBlur(coarse, coarse, backgroundWindowPx);
    const bg = keep(new cv.Mat());
    cv.resize(coarse, bg, new cv.Size(w, h), 0, 0, cv.INTER_LINEAR);
    const plusOne = (m: InstanceType<typeof cv.Mat>) => {
      const ones = keep(new cv.Mat(m.rows, m.cols, cv.CV_8UC1, new cv.Scalar(1)));
      cv.add(m, ones, m);
      free(ones);
    };
    plusOne(bg);

    await breathe();
    // Polarity: cells (heads, midpieces, tails) are the strong pixels on one side of the
    // background; "strong" is beyond POLARITY_SIGMAS × the background's own noise, measured
    // after one round of sigma clipping so the cells do not inflate it. On the quarter-size
    // copy of image / background − 1 (a sixteenth of the work; a head is still several
    // pixels there, and the vote is a count over all of them).
    // (Comparisons against a constant image give 8-bit masks directly; converting float
    // images to 8 bits is several times slower in this build.)
    const ratio = keep(new cv.Mat());
    const quarterBg = keep(new cv.Mat());
    cv.resize(coarse, quarterBg, quarterSize, 0, 0, cv.INTER_LINEAR);
    free(coarse);
    plusOne(quarterBg);
    quarter.convertTo(ratio, cv.CV_32F);
    free(quarter);
    quarterBg.convertTo(quarterBg, cv.CV_32F);
    cv.divide(ratio, quarterBg, ratio);
    free(quarterBg);
    const constant = (v: number, like: { rows: number; cols: number }) => keep(new cv.Mat(like.rows, like.cols, cv.CV_32F, new cv.Scalar(v)));
    const mean = keep(new cv.Mat());
    const sd = keep(new cv.Mat());
    cv.meanStdDev(ratio, mean, sd);
    const centre = mean.data64F[0];
    const quiet = keep(new cv.Mat());
    const low = constant(centre - 3 * sd.data64F[0], ratio);
    const high = constant(centre + 3 * sd.data64F[0], ratio);
    cv.inRange(ratio, low, high, quiet);
    cv.meanStdDev(ratio, mean, sd, quiet);
    const noise = Math.max(sd.data64F[0], 0.005);
    const strong = POLARITY_SIGMAS * noise;
    low.setTo(new cv.Scalar(1 - strong));
    high.setTo(new cv.Scalar(1 + strong));
    cv.compare(ratio, high, quiet, cv.CMP_GT);
    const bright = cv.countNonZero(quiet);
    cv.compare(ratio, low, quiet, cv.CMP_LT);
    const dark = cv.countNonZero(quiet);
    for (const m of [ratio, quiet, low, high, mean, sd]) free(m);
    const polarity: Polarity = options.polarity ?? (bright >= dark ? 'bright' : 'dark');

    // Flattened: ratioScale × image / background, so a dim corner's cells count as much as
    // the centre's (flat-field correction); inverted for dark cells, so cells are bright.
    // Bright cells: background at 64, a head (~3× the background) near the top. Dark cells:
    // background at 255 − 200 = 55, a head (~0.4×) at ~175.
    const ratioScale = polarity === 'bright' ? 64 : 200;
    const flat = keep(new cv.Mat());
    cv.divide(src, bg, flat, ratioScale);
    if (polarity === 'dark') cv.bitwise_not(flat, flat);
    free(bg);

    await breathe();
    const bin = keep(new cv.Mat());
    // Otsu's threshold, but never inside the background's own noise: where cells are a tiny
    // share of the pixels (a coarse scale, a sparse field), Otsu's split falls at the edge of
    // the background's peak and its grain becomes thousands of "cells". A cell pixel stands out
    // of the background as the polarity vote counts it: beyond POLARITY_SIGMAS × its noise.
    const otsuValue = cv.threshold(flat, bin, 0, 255, cv.THRESH_BINARY | cv.THRESH_OTSU);
    const backgroundLevel = polarity === 'bright' ? ratioScale : 255 - ratioScale;
    const noiseFloor = Math.ceil(backgroundLevel + POLARITY_SIGMAS * noise * ratioScale);
    const thresholdValue = Math.max(otsuValue, noiseFloor);
    if (thresholdValue > otsuValue) cv.threshold(flat, bin, thresholdValue, 255, cv.THRESH_BINARY);

    await breathe();
    // Closing with a small disc (fills vacuoles, which would hollow a head out), then
    // opening (drops midpieces and tails, thinner than the opening). Erosions are thresholds
    // of the distance transform (pixels farther than r from the outside: the chamfer disc of
    // radius r, exactly), several times cheaper than an erosion by a kernel in this build.
    // The closing's erosion (by a 3 × 3 cross, the chamfer disc of radius 1) and the
    // opening's come one after the other, and eroding by two discs in turn is eroding once by
    // their sum where B(r) ⊕ B(1) = B(r + 1): true of the 5 × 5 chamfer mask for r = 2.25, so
    // there the dilated mask is eroded once (erodeOnce). The opening's dilation is by an
    // octagon of radius 2 per step (a 3 × 3 cross, then a 3 × 3 square), close to the disc and
    // several times cheaper than a disc kernel or a distance transform of the (mostly
    // foreground) inverse.
    const closingKernel = keep(cv.getStructuringElement(cv.MORPH_ELLIPSE, new cv.Size(closingKernelPx, closingKernelPx)));
    cv.dilate(bin, bin, closingKernel);
    if (!erodeOnce) cv.erode(bin, bin, closingKernel);
    const dist = keep(new cv.Mat());
    const level = constant(erosionRadiusPx, bin);
    cv.distanceTransform(bin, dist, cv.DIST_L2, cv.DIST_MASK_5);
    const eroded = keep(new cv.Mat());
    cv.compare(dist, level, eroded, cv.CMP_GT); // the closed, then eroded mask
    free(bin);
    free(level);
    free(dist);
    // The dilation, piece by piece: the eroded mask is a few hundredths of the image, and a
    // dilation only reaches its radius (2 px per step) beyond each piece's bounding box. So
    // each outer contour's box, grown by that radius, is dilated on its own and laid into
    // the opened mask: the union of the pieces' dilations, which is the dilation of the whole.
    const cross = keep(cv.getStructuringElement(cv.MORPH_CROSS, new cv.Size(3, 3)));
    const square = keep(cv.getStructuringElement(cv.MORPH_RECT, new cv.Size(3, 3)));
    const opened = keep(cv.Mat.zeros(h, w, cv.CV_8UC1));
    const pieces = keep(new cv.MatVector());
    const pieceTree = keep(new cv.Mat());
    cv.findContours(eroded, pieces, pieceTree, cv.RETR_EXTERNAL, cv.CHAIN_APPROX_SIMPLE);
    const reach = 2 * dilateSteps;
    for (let i = 0; i < pieces.size(); i++) {
      const box = cv.boundingRect(pieces.get(i));
      const x = Math.max(0, box.x - reach);
      const y = Math.max(0, box.y - reach);
      const grown = new cv.Rect(x, y, Math.min(w, box.x + box.width + reach) - x, Math.min(h, box.y + box.height + reach) - y);
      withMats((own) => {
        const piece = own(new cv.Mat());
        cv.dilate(own(eroded.roi(grown)), piece, cross);
        cv.dilate(piece, piece, square);
        for (let k = 1; k < dilateSteps; k++) {
          cv.dilate(piece, piece, cross);
          cv.dilate(piece, piece, square);
        }
        const target = own(opened.roi(grown));
        cv.bitwise_or(target, piece, target);
      });
    }
    free(pieces);
    free(pieceTree);
    free(eroded);
    await breathe();
    // Connected components (8-connected) by their outer contours: with the opened mask mostly
    // background, tracing borders is several times cheaper here than labelling every pixel.
    // A component's pixels are its filled outer contour (with the contour line itself, for
    // strands one pixel wide) within the opened mask, so its holes stay out; a component lying
    // inside another's hole would count with it (not seen at the scale of a head).
    const contours = keep(new cv.MatVector());
    const hierarchy = keep(new cv.Mat());
    cv.findContours(opened, contours, hierarchy, cv.RETR_CCOMP, cv.CHAIN_APPROX_NONE);
    // [next, previous, first child, parent] per contour; outer contours have no parent.
    const tree = hierarchy.data32S.slice();
    const outer = Array.from({ length: contours.size() }, (_, i) => i).filter((i) => tree[i * 4 + 3] < 0);

    const minArea = expectedArea * AREA_RANGE[0];
    const loneMaxArea = expectedArea * AREA_RANGE[1];
    const maxArea = expectedArea * CLUSTER_AREA_MAX;
    const minCore = headW * CORE_RANGE[0];
    const maxCore = headW * CORE_RANGE[1];
    const expectedElongation = HEAD_LENGTH_UM / HEAD_WIDTH_UM;
    const fit = (value: number, expected: number, spread: number) => Math.exp(-0.5 * (Math.log(value / expected) / spread) ** 2);
    const standsOut = (mean: number) => Math.min(1, (2 * Math.max(0, mean - thresholdValue)) / Math.max(1, 255 - thresholdValue));
    const coreJoin = keep(cv.getStructuringElement(cv.MORPH_ELLIPSE, new cv.Size(coreJoinPx, coreJoinPx)));
    const candidates: Candidate[] = [];
    const add = (x: number, y: number, score: number) => candidates.push({ x: round((x + 0.5) * sx), y: round((y + 0.5) * sy), score: round(score, 3) });
    let split = 0;

    for (const [done, i] of outer.entries()) {
      if (done % 200 === 199) await breathe();
      const rect = cv.boundingRect(contours.get(i));
      if (rect.width * rect.height < minArea) continue;
      withMats((own) => {
        const mask = own(cv.Mat.zeros(rect.height, rect.width, cv.CV_8UC1));
        const offset = new cv.Point(-rect.x, -rect.y);
        const white = new cv.Scalar(255);
        cv.drawContours(mask, contours, i, white, cv.FILLED, cv.LINE_8, own(new cv.Mat()), 0, offset);
        cv.drawContours(mask, contours, i, white, 1, cv.LINE_8, own(new cv.Mat()), 0, offset);
        cv.bitwise_and(mask, own(opened.roi(rect)), mask);
        const m = cv.moments(mask, true);
        const area = m.m00;
        if (area < minArea || area > maxArea) return;
        // Elongation: axis ratio of the component's equivalent ellipse (second central moments).
        const a = m.mu20 / m.m00;
        const c = m.mu02 / m.m00;
        const b = m.mu11 / m.m00;
        const root = Math.sqrt(((a - c) / 2) ** 2 + b * b);
        const elongation = Math.sqrt(((a + c) / 2 + root) / Math.max((a + c) / 2 - root, 1e-6));
        // Half-thickness at every pixel of the component: a head is the thickest part of a
        // cell. Zeros around it, as the opened mask has (none beyond the image's edge, which
        // the transform takes as far away, as it does for the whole image).
        const pad = { top: rect.y > 0 ? 1 : 0, left: rect.x > 0 ? 1 : 0, bottom: rect.y + rect.height < h ? 1 : 0, right: rect.x + rect.width < w ? 1 : 0 };
        const padded = own(new cv.Mat());
        cv.copyMakeBorder(mask, padded, pad.top, pad.bottom, pad.left, pad.right, cv.BORDER_CONSTANT, new cv.Scalar(0));
        const thickness = own(new cv.Mat());
        cv.distanceTransform(padded, thickness, cv.DIST_L2, cv.DIST_MASK_5);
        const distRoi = own(thickness.roi(new cv.Rect(pad.left, pad.top, rect.width, rect.height)));
        const core = cv.minMaxLoc(distRoi, mask).maxVal;
        const contrast = standsOut(cv.mean(own(flat.roi(rect)), mask)[0]);

        if (area <= loneMaxArea && elongation <= ELONGATION_RANGE[1]) {
          // One head on its own: its centroid.
          if (elongation < ELONGATION_RANGE[0] || core < minCore || core > maxCore) return;
          add(rect.x + m.m10 / m.m00, rect.y + m.m01 / m.m00, fit(area, expectedArea * 1.5, 0.6) * fit(elongation, expectedElongation, 0.4) * (0.5 + 0.5 * contrast));
          return;
        }
        // Longer or larger: a head with a thick midpiece or a droplet still attached, or
        // heads touching. Each part thick enough to be a head gives one candidate, at its
        // thickest point.
        const cores = own(new cv.Mat());
        cv.threshold(distRoi, cores, headW * SPLIT_CORE, 255, cv.THRESH_BINARY);
        cores.convertTo(cores, cv.CV_8U);
        // A wide head's core can come out ragged, in pieces: join pieces closer than the kernel.
        cv.dilate(cores, cores, coreJoin);
        cv.bitwise_and(cores, mask, cores);
        const coreLabels = own(new cv.Mat());
        const k = cv.connectedComponents(cores, coreLabels, 8, cv.CV_32S);
        if (k > 2) split++;
        for (let j = 1; j < k; j++) {
          const coreMask = own(new cv.Mat());
          cv.compare(coreLabels, own(new cv.Mat(rect.height, rect.width, cv.CV_32S, new cv.Scalar(j))), coreMask, cv.CMP_EQ);
          const peak = cv.minMaxLoc(distRoi, coreMask);
          if (peak.maxVal > maxCore) continue;
          add(rect.x + peak.maxLoc.x, rect.y + peak.maxLoc.y, 0.6 * fit(peak.maxVal, headW * 0.63, 0.3) * (0.5 + 0.5 * contrast));
        }
      });
    }
    // Reading order: row by row (bands of 1.5 head lengths), left to right, like a stage scan.
    const band = (HEAD_LENGTH_UM / mpp) * 1.5;
    candidates.sort((p, q) => Math.floor(p.y / band) - Math.floor(q.y / band) || p.x - q.x);

    const found = candidates.length;
    const implausible = found > maxCandidates;
    const params: DetectParams = {
      ...base,
      ...(implausible ? { skipped: `implausible result: ${found} candidates, more than the ${maxCandidates} cells the field could hold` } : {}),
      opencv: /OpenCV ([\d.]+)/.exec(cv.getBuildInformation())?.[1] ?? 'unknown',
      workWidth: w,
      workHeight: h,
      workScale: round(scale, 5),
      resizeKernel: RESIZE_KERNEL,
      grey: work.colour ? 'max of R, G, B' : 'single channel',
      backgroundWindowPx,
      backgroundShrink: BACKGROUND_SHRINK,
      polarity,
      polarityDetected: options.polarity === undefined,
      polarityCounts: { bright, dark },
      polaritySigmas: POLARITY_SIGMAS,
      backgroundNoise: round(noise, 4),
      ratioScale,
      threshold: 'otsu, at least the noise floor',
      otsuValue,
      thresholdFloor: noiseFloor,
      thresholdValue,
      closingKernelPx,
      openingRadiusPx,
      erosionRadiusPx,
      openingDilateSteps: dilateSteps,
      areaPx: { expected: round(expectedArea), min: round(minArea), loneMax: round(loneMaxArea), max: round(maxArea) },
      elongation: { expected: expectedElongation, min: ELONGATION_RANGE[0], max: ELONGATION_RANGE[1] },
      coreHalfWidthPx: { min: round(minCore), max: round(maxCore), split: round(headW * SPLIT_CORE) },
      coreJoinKernelPx: coreJoinPx,
      components: outer.length,
      split,
      found,
    };
    return { candidates: implausible ? [] : candidates, method: METHOD, params, ms: Math.round(performance.now() - t0) };
  });
}
