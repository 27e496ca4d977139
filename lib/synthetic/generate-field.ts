// Synthetic field images for demos, tests and benchmarks: sperm cells drawn on an
// eosin–nigrosin-like background, with every cell's position and class known.
// Same options (seed included) → same pixels and same cell list.
//
// Harder fields for testing cell detection against truth (all off by default, so a field
// drawn without them is the same as before they existed): `look` 'phase' for dark cells on a
// light field, `overlap` for cells lying across one another, `debris` for particles that
// are not cells, `illumination` for a field lit unevenly. Magnification is `micronsPerPixel`:
// the cells are drawn to scale, so 0.5 µm/px gives heads half as long in pixels as 0.25.
//
// Scale: 0.25 µm per pixel by default (4 px/µm), so a ~70 µm cell spans ~280 px and
// a head ~24 × 12 px, about what a 100× objective gives on a common camera. At
// 0.1 µm/px a 1600 × 1200 field would hold barely two whole cells.
import sharp from 'sharp';
import { between, mulberry32, pickWeighted, type Random } from './prng';
import { drawCell, SPERM_CLASS_KEYS, type CellLook, type Disc, type SpermClassKey } from './sperm';

export type FieldFormat = 'png' | 'jpeg' | 'tiff' | 'tiff16';

/** Exact counts per class, or a total drawn from class weights. */
export type CellDistribution =
  | number
  | Partial<Record<SpermClassKey, number>>
  | { total: number; weights: Partial<Record<SpermClassKey, number>> };

export interface FieldOptions {
  seed: number;
  width?: number;
  height?: number;
  micronsPerPixel?: number;
  cells: CellDistribution;
  /** Share of live (unstained) cells; the rest take up eosin. Default 0.75. */
  liveFraction?: number;
  /** Least gap between any two cells, in µm. Default 4. */
  minSpacingMicrons?: number;
  /**
   * Output encoding (default 'png'). 'tiff16' is a 16-bit greyscale TIFF holding
   * 12-bit values (0–4095), as many microscope cameras write.
   */
  format?: FieldFormat;
  /** JPEG quality when format is 'jpeg' (default 92). */
  quality?: number;
  /** 'stained' (default): bright cells on a dark eosin–nigrosin field; 'phase': dark cells on a light field. */
  look?: CellLook;
  /**
   * Share of cells (0–1) laid across another cell instead of apart from every cell: a
   * head on a tail, two cells crossing, heads touching. Head centres stay at least
   * OVERLAP_HEAD_GAP_UM apart, so each is still one cell a reader can mark. Default 0.
   */
  overlap?: number;
  /** Particles that are not cells (stain clumps, round specks, fibres) per megapixel, on top of the few specks every field has. Default 0. */
  debris?: number;
  /** Uneven lighting, 0–1: the share by which the dimmest part of the field is darker than the brightest. Default 0. */
  illumination?: number;
}

/** Least distance between two head centres when cells overlap, in µm (a head is ~6 × 3 µm). */
export const OVERLAP_HEAD_GAP_UM = 5;

export interface FieldCell {
  /** Head centre in pixels: where a reader places the mark. */
  x: number;
  y: number;
  classKey: SpermClassKey;
  /** Direction from head to tail, degrees clockwise from +x (image y points down). */
  angle: number;
  /** Unstained (live) or eosin-stained (dead) when smeared. */
  live: boolean;
  /** Set when the cell was laid across another one (the `overlap` option). */
  overlapping?: true;
}

export interface Field {
  image: Buffer;
  format: FieldFormat;
  contentType: string;
  width: number;
  height: number;
  micronsPerPixel: number;
  look: CellLook;
  cells: FieldCell[];
}

/** Default mix when only a total is given: a fairly good ejaculate (invented). */
export const DEFAULT_CLASS_WEIGHTS: Readonly<Record<SpermClassKey, number>> = {
  normal: 0.55,
  abnormal_head: 0.06,
  acrosome_defect: 0.04,
  nuclear_vacuoles: 0.04,
  abnormal_midpiece: 0.07,
  proximal_droplet: 0.07,
  distal_droplet: 0.06,
  bent_coiled_tail: 0.07,
  detached_head: 0.03,
  other: 0.01,
};

export const FIELD_DEFAULTS = { width: 1600, height: 1200, micronsPerPixel: 0.25 } as const;

function classList(rnd: Random, cells: CellDistribution): SpermClassKey[] {
  const draw = (total: number, weights: Partial<Record<SpermClassKey, number>>) => {
    const pairs = SPERM_CLASS_KEYS.map((k) => [k, weights[k] ?? 0] as const).filter(([, w]) => w > 0);
    if (pairs.length === 0) throw new RangeError('Class weights must include at least one positive weight.');
    return Array.from({ length: total }, () => pickWeighted(rnd, pairs));
  };
  let list: SpermClassKey[];
  if (typeof cells === 'number') list = draw(cells, DEFAULT_CLASS_WEIGHTS);
  else if ('total' in cells && typeof cells.total === 'number') list = draw(cells.total, cells.weights);
  else {
    const counts = cells as Partial<Record<SpermClassKey, number>>;
    list = SPERM_CLASS_KEYS.flatMap((k) => Array.from({ length: counts[k] ?? 0 }, () => k));
    // Shuffle so no class is crowded out by being placed last.
    for (let i = list.length - 1; i > 0; i--) {
      const j = Math.floor(rnd() * (i + 1));
      [list[i], list[j]] = [list[j], list[i]];
    }
  }
  for (const k of list) if (!SPERM_CLASS_KEYS.includes(k)) throw new RangeError(`Unknown class key "${k}".`);
  return list;
}

interface Placed {
  discs: Disc[]; // pixels, image frame
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

function place(discs: Disc[], x: number, y: number, angle: number, pxPerMicron: number): Placed {
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  const out: Disc[] = discs.map(([dx, dy, r]) => {
    const gx = x + (dx * c - dy * s) * pxPerMicron;
    const gy = y + (dx * s + dy * c) * pxPerMicron;
    const gr = r * pxPerMicron;
    minX = Math.min(minX, gx - gr);
    minY = Math.min(minY, gy - gr);
    maxX = Math.max(maxX, gx + gr);
    maxY = Math.max(maxY, gy + gr);
    return [gx, gy, gr] as const;
  });
  return { discs: out, minX, minY, maxX, maxY };
}

function clashes(a: Placed, b: Placed, gap: number): boolean {
  if (a.maxX + gap < b.minX || b.maxX + gap < a.minX || a.maxY + gap < b.minY || b.maxY + gap < a.minY) return false;
  for (const [ax, ay, ar] of a.discs) {
    for (const [bx, by, br] of b.discs) {
      const d = ar + br + gap;
      if ((ax - bx) ** 2 + (ay - by) ** 2 < d * d) return true;
    }
  }
  return false;
}

/** Nigrosin field at quarter resolution: dark purple-grey, uneven smear, darker rim. */
function background(rnd: Random, w: number, h: number, look: CellLook): Buffer {
  const out = Buffer.allocUnsafe(w * h * 3);
  // Two octaves of value noise for the uneven thickness of the smear.
  const grid = (cell: number) => {
    const gw = Math.ceil(w / cell) + 2;
    const gh = Math.ceil(h / cell) + 2;
    const values = Float32Array.from({ length: gw * gh }, () => rnd() * 2 - 1);
    return { cell, gw, values };
  };
  const coarse = grid(90);
  const fine = grid(22);
  const sample = (g: ReturnType<typeof grid>, x: number, y: number) => {
    const fx = x / g.cell;
    const fy = y / g.cell;
    const ix = Math.floor(fx);
    const iy = Math.floor(fy);
    const tx = fx - ix;
    const ty = fy - iy;
    const sx = tx * tx * (3 - 2 * tx);
    const sy = ty * ty * (3 - 2 * ty);
    const v = g.values;
    const i = iy * g.gw + ix;
    const top = v[i] + (v[i + 1] - v[i]) * sx;
    const bottom = v[i + g.gw] + (v[i + g.gw + 1] - v[i + g.gw]) * sx;
    return top + (bottom - top) * sy;
  };
  const cx = w / 2;
  const cy = h / 2;
  const rr = 1 / (cx * cx + cy * cy);
  // Base tint; drawn per field so fields of one smear differ a little.
  const base =
    look === 'phase'
      ? [between(rnd, 176, 188), between(rnd, 178, 190), between(rnd, 174, 186)]
      : [between(rnd, 60, 70), between(rnd, 50, 58), between(rnd, 68, 78)];
  let o = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const n = 0.65 * sample(coarse, x, y) + 0.35 * sample(fine, x, y);
      const vignette = 1 - 0.3 * ((x - cx) ** 2 + (y - cy) ** 2) * rr;
      const k = vignette * (1 + 0.16 * n);
      out[o++] = Math.max(0, Math.min(255, base[0] * k));
      out[o++] = Math.max(0, Math.min(255, base[1] * k));
      out[o++] = Math.max(0, Math.min(255, base[2] * k));
    }
  }
  return out;
}

/**
 * Adds film-like grain from a repeating tile of noise, in place. The blur after it
 * hides the tile's repeat; doing this in JS is twice as fast as a soft-light composite.
 */
function addGrain(rnd: Random, pixels: Buffer, width: number, height: number, channels: number): void {
  const size = 512;
  const tile = Int8Array.from({ length: size * size }, () => Math.round((rnd() + rnd() + rnd() - 1.5) * 14));
  for (let y = 0; y < height; y++) {
    const row = (y % size) * size;
    let o = y * width * channels;
    for (let x = 0; x < width; x++) {
      const n = tile[row + (x % size)];
      for (let c = 0; c < 3; c++) {
        const v = pixels[o + c] + n;
        pixels[o + c] = v < 0 ? 0 : v > 255 ? 255 : v;
      }
      o += channels;
    }
  }
}

/** Specks of stain and debris that every real smear has; they are not cells. */
function debris(rnd: Random, w: number, h: number, pxPerMicron: number, look: CellLook): string {
  const n = Math.round((w * h) / 250_000);
  const [light, dark] = look === 'phase' ? ['#e9e9e6', '#6d7076'] : ['#9d8fa3', '#2c2433'];
  let svg = '';
  for (let i = 0; i < n; i++) {
    const r = between(rnd, 0.3, 1.2) * pxPerMicron;
    const isLight = rnd() < 0.4;
    svg += `<circle cx="${Math.round(rnd() * w)}" cy="${Math.round(rnd() * h)}" r="${r.toFixed(1)}" fill="${isLight ? light : dark}" fill-opacity="0.7"/>`;
  }
  return svg;
}

/**
 * Particles that are not cells, for testing detection: round specks and droplets of stain
 * (1.5–5 µm), irregular clumps, and fibres. Their tone is the cells' side of the
 * background (bright on a stained field, dark on a phase field), so they compete with heads.
 */
function extraDebris(rnd: Random, w: number, h: number, pxPerMicron: number, look: CellLook, perMegapixel: number): string {
  const n = Math.round((w * h * perMegapixel) / 1e6);
  const tones = look === 'phase' ? ['#4a4d53', '#5e6167', '#3e4146'] : ['#e8dfe6', '#c9a6b8', '#d8cfd9'];
  const um = (v: number) => (v * pxPerMicron).toFixed(1);
  let svg = '';
  for (let i = 0; i < n; i++) {
    const x = rnd() * w;
    const y = rnd() * h;
    const tone = tones[Math.floor(rnd() * tones.length)];
    const kind = rnd();
    if (kind < 0.45) {
      svg += `<circle cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="${um(between(rnd, 0.75, 2.5))}" fill="${tone}" fill-opacity="${between(rnd, 0.6, 0.95).toFixed(2)}"/>`;
    } else if (kind < 0.8) {
      const parts = 3 + Math.floor(rnd() * 4);
      for (let k = 0; k < parts; k++) {
        svg += `<circle cx="${(x + between(rnd, -2.5, 2.5) * pxPerMicron).toFixed(1)}" cy="${(y + between(rnd, -2.5, 2.5) * pxPerMicron).toFixed(1)}" r="${um(between(rnd, 0.5, 1.4))}" fill="${tone}" fill-opacity="0.85"/>`;
      }
    } else {
      const len = between(rnd, 10, 40) * pxPerMicron;
      const a = rnd() * 2 * Math.PI;
      const bend = between(rnd, -0.4, 0.4);
      const mx = x + Math.cos(a + bend) * len * 0.5;
      const my = y + Math.sin(a + bend) * len * 0.5;
      svg += `<path d="M${x.toFixed(1)} ${y.toFixed(1)}Q${mx.toFixed(1)} ${my.toFixed(1)} ${(x + Math.cos(a) * len).toFixed(1)} ${(y + Math.sin(a) * len).toFixed(1)}" fill="none" stroke="${tone}" stroke-width="${um(between(rnd, 0.4, 0.9))}" stroke-linecap="round"/>`;
    }
  }
  return svg;
}

/**
 * Dims the field smoothly, in place: full light around a point somewhere in the frame,
 * falling to (1 − strength) far from it, as a lamp off-centre or a tilted condenser gives.
 */
function illuminate(rnd: Random, pixels: Buffer, width: number, height: number, channels: number, strength: number): void {
  const cx = between(rnd, 0.1, 0.9) * width;
  const cy = between(rnd, 0.1, 0.9) * height;
  const twoSigma2 = 2 * (0.45 * Math.hypot(width, height)) ** 2;
  const row = new Float32Array(width);
  for (let y = 0; y < height; y++) {
    const dy2 = (y - cy) ** 2;
    for (let x = 0; x < width; x++) row[x] = 1 - strength + strength * Math.exp(-((x - cx) ** 2 + dy2) / twoSigma2);
    let o = y * width * channels;
    for (let x = 0; x < width; x++) {
      const g = row[x];
      for (let c = 0; c < 3; c++) pixels[o + c] = Math.round(pixels[o + c] * g);
      o += channels;
    }
  }
}

const CONTENT_TYPES: Record<FieldFormat, string> = {
  png: 'image/png',
  jpeg: 'image/jpeg',
  tiff: 'image/tiff',
  tiff16: 'image/tiff',
};

/** Draws one synthetic field. Throws RangeError when the cells cannot all fit. */
export async function generateField(options: FieldOptions): Promise<Field> {
  const width = options.width ?? FIELD_DEFAULTS.width;
  const height = options.height ?? FIELD_DEFAULTS.height;
  const micronsPerPixel = options.micronsPerPixel ?? FIELD_DEFAULTS.micronsPerPixel;
  const format = options.format ?? 'png';
  if (!(Number.isInteger(width) && Number.isInteger(height) && width >= 16 && height >= 16)) {
    throw new RangeError('Field width and height must be whole numbers of at least 16 pixels.');
  }
  if (!(micronsPerPixel > 0)) throw new RangeError('micronsPerPixel must be positive.');
  const pxPerMicron = 1 / micronsPerPixel;
  // Separate streams, so changing the cells does not change the background and back.
  const cellRnd = mulberry32(options.seed);
  const bgRnd = mulberry32((options.seed ^ 0x5bd1e995) >>> 0);

  // A third stream for the testing options, so using them leaves the other two untouched.
  const extraRnd = mulberry32((options.seed ^ 0x9e3779b9) >>> 0);
  const look = options.look ?? 'stained';
  const overlap = options.overlap ?? 0;
  const debrisPerMegapixel = options.debris ?? 0;
  const illumination = options.illumination ?? 0;
  if (!(overlap >= 0 && overlap <= 1)) throw new RangeError('overlap must be between 0 and 1.');
  if (!(illumination >= 0 && illumination < 1)) throw new RangeError('illumination must be at least 0 and below 1.');
  if (!(debrisPerMegapixel >= 0)) throw new RangeError('debris must not be negative.');
  const headGap = OVERLAP_HEAD_GAP_UM * pxPerMicron;

  const classes = classList(cellRnd, options.cells);
  const liveFraction = options.liveFraction ?? 0.75;
  const gap = (options.minSpacingMicrons ?? 4) * pxPerMicron;
  const edge = 2 * pxPerMicron; // keep whole cells inside the frame
  const placed: Placed[] = [];
  const cells: FieldCell[] = [];
  const svgCells: string[] = [];
  const maxTries = 500;

  for (const classKey of classes) {
    const live = cellRnd() < liveFraction;
    const drawing = drawCell(cellRnd, classKey, live, look);
    // Only asked for when overlap is on, so default fields draw the same numbers as ever.
    const across = overlap > 0 && placed.length > 0 && extraRnd() < overlap;
    let done = false;
    for (let t = 0; t < maxTries && !done; t++) {
      let angle = cellRnd() * 2 * Math.PI;
      let x = cellRnd() * width;
      let y = cellRnd() * height;
      if (across) {
        // Head near a random part of a cell already placed (its head, midpiece or tail).
        const q = placed[Math.floor(extraRnd() * placed.length)];
        const [dx, dy] = q.discs[Math.floor(extraRnd() * q.discs.length)];
        const a = extraRnd() * 2 * Math.PI;
        const r = between(extraRnd, 1, 5) * pxPerMicron;
        x = dx + Math.cos(a) * r;
        y = dy + Math.sin(a) * r;
        angle = extraRnd() * 2 * Math.PI;
      }
      const p = place(drawing.footprint, x, y, angle, pxPerMicron);
      if (p.minX < edge || p.minY < edge || p.maxX > width - edge || p.maxY > height - edge) continue;
      if (across ? cells.some((c) => (c.x - x) ** 2 + (c.y - y) ** 2 < headGap * headGap) : placed.some((q) => clashes(p, q, gap))) continue;
      placed.push(p);
      const deg = (angle * 180) / Math.PI;
      cells.push({ x: Math.round(x * 10) / 10, y: Math.round(y * 10) / 10, classKey, angle: Math.round(deg * 10) / 10, live, ...(across ? { overlapping: true as const } : {}) });
      svgCells.push(
        `<g transform="translate(${x.toFixed(2)} ${y.toFixed(2)}) rotate(${deg.toFixed(3)}) scale(${pxPerMicron})">${drawing.svg}</g>`,
      );
      done = true;
    }
    if (!done) {
      throw new RangeError(
        `Only ${cells.length} of ${classes.length} cells fit in a ${width} × ${height} px field at ${micronsPerPixel} µm/px; ask for fewer cells or a larger field.`,
      );
    }
  }

  const qw = Math.ceil(width / 4);
  const qh = Math.ceil(height / 4);
  const svg = Buffer.from(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">` +
      debris(bgRnd, width, height, pxPerMicron, look) +
      (debrisPerMegapixel > 0 ? extraDebris(extraRnd, width, height, pxPerMicron, look, debrisPerMegapixel) : '') +
      svgCells.join('') +
      '</svg>',
  );
  // The background is smooth, so a nearest-neighbour upscale (5× faster than cubic
  // here) leaves no visible steps once grain and blur are on.
  const drawn = await sharp(background(bgRnd, qw, qh, look), { raw: { width: qw, height: qh, channels: 3 } })
    .resize(width, height, { kernel: 'nearest', fit: 'fill' })
    .composite([{ input: svg, top: 0, left: 0 }])
    .raw()
    .toBuffer({ resolveWithObject: true });
  if (illumination > 0) illuminate(extraRnd, drawn.data, width, height, drawn.info.channels, illumination);
  addGrain(bgRnd, drawn.data, width, height, drawn.info.channels);
  // A light blur gives the soft focus of a real objective.
  let out = sharp(drawn.data, { raw: { width, height, channels: drawn.info.channels } })
    .removeAlpha()
    .blur(0.7);

  let image: Buffer;
  if (format === 'tiff16') {
    const grey = await out.toColourspace('b-w').raw().toBuffer();
    const samples = new Uint16Array(width * height);
    // 12-bit camera values in a 16-bit container.
    for (let i = 0; i < samples.length; i++) samples[i] = grey[i] * 16 + (grey[i] >> 4);
    out = sharp(samples, { raw: { width, height, channels: 1 } });
    image = await out.toColourspace('grey16').tiff({ compression: 'lzw', predictor: 'horizontal' }).toBuffer();
  } else if (format === 'tiff') {
    image = await out.tiff({ compression: 'lzw', predictor: 'horizontal' }).toBuffer();
  } else if (format === 'jpeg') {
    image = await out.jpeg({ quality: options.quality ?? 92, mozjpeg: false }).toBuffer();
  } else {
    image = await out.png({ compressionLevel: 6 }).toBuffer();
  }
  return { image, format, contentType: CONTENT_TYPES[format], width, height, micronsPerPixel, look, cells };
}
