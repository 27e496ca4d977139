// Drawing of one sperm cell per class, in micrometres, in the cell's own frame:
// head centre at the origin, apex towards −x, midpiece and tail towards +x.
// Equine sizes (common practice, rounded): head ~6 × 3 µm, midpiece ~9 µm,
// tail ~55 µm, so a whole cell is ~70 µm long.
import { between, gaussish, type Random } from './prng';

export const SPERM_CLASS_KEYS = [
  'normal',
  'abnormal_head',
  'acrosome_defect',
  'nuclear_vacuoles',
  'abnormal_midpiece',
  'proximal_droplet',
  'distal_droplet',
  'bent_coiled_tail',
  'detached_head',
  'other',
] as const;
export type SpermClassKey = (typeof SPERM_CLASS_KEYS)[number];

/** A disc of the cell's footprint (µm, cell frame), used to keep cells apart. */
export type Disc = readonly [x: number, y: number, r: number];

export interface CellDrawing {
  /** SVG elements in µm, cell frame. */
  svg: string;
  footprint: Disc[];
}

interface Palette {
  head: string;
  headEdge: string;
  midpiece: string;
  tail: string;
  droplet: string;
  halo: string;
  /** Nuclear vacuoles: craters that let the background show through. */
  vacuole: string;
}

/**
 * How the cells look: 'stained' — eosin–nigrosin smear, bright (live) or pink (dead) cells
 * on a dark field; 'phase' — phase contrast / DIC wet mount, dark cells with a bright halo on
 * a light field (no stain, so live and dead look alike).
 */
export type CellLook = 'stained' | 'phase';

// Live sperm keep the eosin out and stay white; dead ones take it up and show pink
// heads (and a pinkish midpiece). Nigrosin gives the dark field.
const LIVE: Palette = {
  head: '#f4f0f3', headEdge: '#d9d1da', midpiece: '#ece6ec', tail: '#e2dbe3', droplet: '#f7f3f5', halo: '#b9aebd', vacuole: '#4a3f52',
};
const DEAD: Palette = {
  head: '#e387ad', headEdge: '#c96a93', midpiece: '#e4a5c0', tail: '#dcc5d2', droplet: '#efc4d6', halo: '#b08ca2', vacuole: '#4a3f52',
};
// Phase contrast: the dense head darkest, thinner parts less so, a light halo around all.
const PHASE: Palette = {
  head: '#3b3e44', headEdge: '#2a2c31', midpiece: '#54575d', tail: '#686b71', droplet: '#4b4e54', halo: '#f6f6f4', vacuole: '#a9abb0',
};

const f = (n: number) => (Math.round(n * 100) / 100).toString();

/** Walks a path of segments with constant curvature (1/µm), sampling every `step` µm. */
function walk(
  x: number,
  y: number,
  heading: number,
  segments: ReadonlyArray<{ length: number; curvature: number; wave?: number; waveLength?: number }>,
  step = 0.5,
): { points: Array<[number, number]>; heading: number } {
  const points: Array<[number, number]> = [[x, y]];
  let h = heading;
  let travelled = 0;
  for (const s of segments) {
    const n = Math.max(1, Math.round(s.length / step));
    const ds = s.length / n;
    for (let i = 0; i < n; i++) {
      travelled += ds;
      // A gentle beat: the heading swings around the segment's own curvature.
      const beat = s.wave ? s.wave * Math.cos((2 * Math.PI * travelled) / (s.waveLength ?? 20)) * ds : 0;
      h += s.curvature * ds + beat;
      x += Math.cos(h) * ds;
      y += Math.sin(h) * ds;
      points.push([x, y]);
    }
  }
  return { points, heading: h };
}

function pathOf(points: ReadonlyArray<[number, number]>, every = 3): string {
  const kept = points.filter((_, i) => i % every === 0 || i === points.length - 1);
  return 'M' + kept.map(([x, y]) => `${f(x)} ${f(y)}`).join('L');
}

function strokes(d: string, colour: string, width: number, halo: string): string {
  return (
    `<path d="${d}" fill="none" stroke="${halo}" stroke-opacity="0.35" stroke-width="${f(width + 0.7)}" stroke-linecap="round" stroke-linejoin="round"/>` +
    `<path d="${d}" fill="none" stroke="${colour}" stroke-width="${f(width)}" stroke-linecap="round" stroke-linejoin="round"/>`
  );
}

function discsAlong(points: ReadonlyArray<[number, number]>, r: number, every = 3): Disc[] {
  return points.filter((_, i) => i % every === 0 || i === points.length - 1).map(([x, y]) => [x, y, r] as const);
}

function ellipseHead(p: Palette, rx: number, ry: number): string {
  return (
    `<ellipse cx="0" cy="0" rx="${f(rx + 0.35)}" ry="${f(ry + 0.35)}" fill="${p.halo}" fill-opacity="0.35"/>` +
    `<ellipse cx="0" cy="0" rx="${f(rx)}" ry="${f(ry)}" fill="${p.head}" stroke="${p.headEdge}" stroke-width="0.25"/>`
  );
}

/** Pear-shaped (pyriform) head: broad at the apex, narrowing to the neck. */
function pearHead(p: Palette, scale: number): string {
  const s = (n: number) => f(n * scale);
  const d =
    `M${s(-3.4)} 0 C${s(-3.4)} ${s(-2.4)} ${s(-0.6)} ${s(-2.3)} ${s(1)} ${s(-1.3)} ` +
    `C${s(2.2)} ${s(-0.6)} ${s(3.2)} ${s(-0.35)} ${s(3.2)} 0 ` +
    `C${s(3.2)} ${s(0.35)} ${s(2.2)} ${s(0.6)} ${s(1)} ${s(1.3)} ` +
    `C${s(-0.6)} ${s(2.3)} ${s(-3.4)} ${s(2.4)} ${s(-3.4)} 0Z`;
  return (
    `<path d="${d}" fill="${p.halo}" fill-opacity="0.35" stroke="${p.halo}" stroke-opacity="0.35" stroke-width="0.7"/>` +
    `<path d="${d}" fill="${p.head}" stroke="${p.headEdge}" stroke-width="0.25"/>`
  );
}

interface Flagellum {
  svg: string;
  footprint: Disc[];
}

/** Midpiece from the neck and the tail after it; `tailSegments` shape the tail. */
function flagellum(
  rnd: Random,
  p: Palette,
  neckX: number,
  heading: number,
  opts: {
    midpieceLength: number;
    midpieceWidth?: number;
    midpieceKink?: number;
    tailSegments?: Array<{ length: number; curvature: number; wave?: number; waveLength?: number }>;
  },
): Flagellum & { midpieceEnd: [number, number] } {
  const half = opts.midpieceLength / 2;
  const mid = walk(neckX, 0, heading, [
    { length: half, curvature: gaussish(rnd) * 0.01 },
    // A kink is a sharp change of direction half-way, as in a bent midpiece.
    ...(opts.midpieceKink ? [{ length: 0.5, curvature: opts.midpieceKink / 0.5 }] : []),
    { length: half, curvature: gaussish(rnd) * 0.01 },
  ]);
  const end = mid.points[mid.points.length - 1];
  const tailSegments = opts.tailSegments ?? straightTail(rnd);
  const tail = walk(end[0], end[1], mid.heading, tailSegments);
  const first = tail.points.slice(0, Math.ceil(tail.points.length / 2) + 1);
  const second = tail.points.slice(Math.ceil(tail.points.length / 2));
  const width = opts.midpieceWidth ?? 1;
  const svg =
    strokes(pathOf(first), p.tail, 0.6, p.halo) +
    strokes(pathOf(second), p.tail, 0.4, p.halo) +
    strokes(pathOf(mid.points, 2), p.midpiece, width, p.halo);
  return {
    svg,
    footprint: [...discsAlong(mid.points, Math.max(1.2, width / 2 + 0.6), 2), ...discsAlong(tail.points, 1.2)],
    midpieceEnd: end,
  };
}

/** A normal tail: ~55 µm after the midpiece, gently curved and beating. */
function straightTail(rnd: Random, length = between(rnd, 52, 58)) {
  const parts = 3;
  return Array.from({ length: parts }, () => ({
    length: length / parts,
    curvature: gaussish(rnd) * 0.012,
    wave: between(rnd, 0.01, 0.035),
    waveLength: between(rnd, 14, 24),
  }));
}

/** Draws one cell of the given class. */
export function drawCell(rnd: Random, classKey: SpermClassKey, live: boolean, look: CellLook = 'stained'): CellDrawing {
  const p = look === 'phase' ? PHASE : live ? LIVE : DEAD;
  const k = 1 + gaussish(rnd) * 0.03; // natural size spread
  const rx = 3 * k;
  const ry = 1.55 * k;
  const headDiscs: Disc[] = [
    [-rx * 0.6, 0, ry + 0.4],
    [0, 0, ry + 0.4],
    [rx * 0.6, 0, ry + 0.4],
  ];
  const neck = rx - 0.1;
  const midpieceLength = between(rnd, 8.5, 10);
  const parts: string[] = [];
  const footprint: Disc[] = [...headDiscs];
  const addFlagellum = (fl: Flagellum) => {
    parts.unshift(fl.svg); // under the head
    footprint.push(...fl.footprint);
  };

  switch (classKey) {
    case 'normal':
    case 'acrosome_defect':
    case 'nuclear_vacuoles': {
      addFlagellum(flagellum(rnd, p, neck, 0, { midpieceLength }));
      parts.push(ellipseHead(p, rx, ry));
      if (classKey === 'acrosome_defect') {
        // A ragged apical cap with a knob: the acrosome is swollen or lifted.
        parts.push(
          `<path d="M${f(-rx * 0.35)} ${f(-ry * 0.95)} Q${f(-rx * 1.25)} ${f(-ry * 1.05)} ${f(-rx - 0.55)} 0 Q${f(-rx * 1.25)} ${f(ry * 1.05)} ${f(-rx * 0.35)} ${f(ry * 0.95)}" fill="none" stroke="${p.headEdge}" stroke-width="0.45" stroke-dasharray="0.55 0.3"/>`,
          `<circle cx="${f(-rx - 0.45)}" cy="${f(between(rnd, -0.5, 0.5))}" r="0.6" fill="${p.headEdge}"/>`,
          `<path d="M${f(-rx * 0.35)} ${f(-ry * 0.9)} L${f(-rx * 0.35)} ${f(ry * 0.9)}" stroke="${p.headEdge}" stroke-width="0.3"/>`,
        );
        footprint.push([-rx - 0.5, 0, 1]);
      }
      if (classKey === 'nuclear_vacuoles') {
        // Small dark craters in the nucleus.
        const n = 2 + Math.floor(rnd() * 3);
        for (let i = 0; i < n; i++) {
          const vx = between(rnd, -rx * 0.5, rx * 0.55);
          const vy = between(rnd, -ry * 0.45, ry * 0.45);
          parts.push(`<circle cx="${f(vx)}" cy="${f(vy)}" r="${f(between(rnd, 0.3, 0.5))}" fill="${p.vacuole}" fill-opacity="0.75"/>`);
        }
      }
      break;
    }
    case 'abnormal_head': {
      const scale = between(rnd, 1.2, 1.45);
      addFlagellum(flagellum(rnd, p, 3.1 * scale, 0, { midpieceLength }));
      parts.push(pearHead(p, scale));
      footprint.push([-3 * scale * 0.6, 0, 2.4 * scale], [3 * scale * 0.5, 0, 1.6 * scale]);
      break;
    }
    case 'abnormal_midpiece': {
      addFlagellum(
        flagellum(rnd, p, neck, 0, {
          midpieceLength,
          midpieceWidth: between(rnd, 1.9, 2.4),
          midpieceKink: (rnd() < 0.5 ? -1 : 1) * between(rnd, 0.6, 1.1),
        }),
      );
      parts.push(ellipseHead(p, rx, ry));
      break;
    }
    case 'proximal_droplet':
    case 'distal_droplet': {
      const fl = flagellum(rnd, p, neck, 0, { midpieceLength });
      addFlagellum(fl);
      parts.push(ellipseHead(p, rx, ry));
      // Proximal: at the neck, just behind the head. Distal: at the end of the midpiece.
      const [dx, dy] = classKey === 'proximal_droplet' ? [neck + 0.9, 0] : fl.midpieceEnd;
      const r = between(rnd, 1.0, 1.35);
      parts.push(
        `<circle cx="${f(dx)}" cy="${f(dy + between(rnd, -0.3, 0.3))}" r="${f(r + 0.3)}" fill="${p.halo}" fill-opacity="0.35"/>`,
        `<circle cx="${f(dx)}" cy="${f(dy)}" r="${f(r)}" fill="${p.droplet}" stroke="${p.headEdge}" stroke-width="0.2"/>`,
      );
      footprint.push([dx, dy, r + 0.5]);
      break;
    }
    case 'bent_coiled_tail': {
      const side = rnd() < 0.5 ? -1 : 1;
      let tailSegments;
      if (rnd() < 0.7) {
        // Coiled: the tail winds into a loop close to the midpiece.
        const radius = between(rnd, 3.5, 5.5);
        const turns = between(rnd, 1.1, 1.8);
        const coil = 2 * Math.PI * radius * turns;
        tailSegments = [
          { length: between(rnd, 2, 6), curvature: 0 },
          { length: coil, curvature: side / radius },
          { length: Math.max(4, 50 - coil - 4), curvature: gaussish(rnd) * 0.02, wave: 0.02, waveLength: 18 },
        ];
      } else {
        // Bent: a hairpin fold, the tail running back along itself.
        tailSegments = [
          { length: between(rnd, 6, 14), curvature: 0.005 * side },
          { length: 3.2, curvature: (side * Math.PI * 0.95) / 3.2 },
          { length: between(rnd, 26, 34), curvature: -0.004 * side },
        ];
      }
      addFlagellum(flagellum(rnd, p, neck, 0, { midpieceLength, tailSegments }));
      parts.push(ellipseHead(p, rx, ry));
      break;
    }
    case 'detached_head': {
      // Head alone, a stub of neck at most; the tail is elsewhere or gone.
      parts.push(ellipseHead(p, rx, ry));
      parts.push(`<path d="M${f(neck)} 0L${f(neck + 0.5)} 0" stroke="${p.headEdge}" stroke-width="0.6" stroke-linecap="round"/>`);
      break;
    }
    case 'other': {
      if (rnd() < 0.5) {
        // Two tails from one head.
        const spread = between(rnd, 0.25, 0.45);
        addFlagellum(flagellum(rnd, p, neck, -spread, { midpieceLength }));
        addFlagellum(flagellum(rnd, p, neck, spread, { midpieceLength }));
        parts.push(ellipseHead(p, rx, ry));
      } else {
        // A premature germ cell: round, larger than a head, with a darker nucleus.
        const r = between(rnd, 4, 5.5);
        parts.length = 0;
        footprint.length = 0;
        parts.push(
          `<circle cx="0" cy="0" r="${f(r + 0.4)}" fill="${p.halo}" fill-opacity="0.35"/>`,
          `<circle cx="0" cy="0" r="${f(r)}" fill="${p.droplet}" stroke="${p.headEdge}" stroke-width="0.3"/>`,
          `<circle cx="${f(between(rnd, -0.8, 0.8))}" cy="${f(between(rnd, -0.8, 0.8))}" r="${f(r * 0.5)}" fill="${p.headEdge}" fill-opacity="0.8"/>`,
        );
        footprint.push([0, 0, r + 0.5]);
      }
      break;
    }
  }
  return { svg: parts.join(''), footprint };
}
