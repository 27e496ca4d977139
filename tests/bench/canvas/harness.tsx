// Browser side of tests/bench/canvas.bench.ts: the real FieldCanvas module on a
// 4000 × 3000 field, driven and timed inside the page with performance.now().
import Konva from 'konva';
import { useEffect, useState } from 'react';
import { flushSync } from 'react-dom';
import { createRoot } from 'react-dom/client';
import { FieldCanvas, type FieldCanvasControl } from '@/components/scoring/field-canvas';
import type { FieldImageRef } from '@/lib/scoring/types';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import type { ScoringMark } from '@/lib/scoring/types';
import { mulberry32 } from '@/lib/synthetic/prng';

const W = 4000;
const H = 3000;
const image: FieldImageRef = {
  id: '1',
  fileName: 'bench-field.jpg',
  width: W,
  height: H,
  micronsPerPixel: 0.25,
  position: 1,
  displayUrl: '/field.jpg',
  thumbUrl: '/field.jpg',
};
const classes = new Map(DEFAULT_CLASS_SET.classes.map((c) => [c.key, c]));
const keys = [...classes.keys()];


let counter = 0;
function makeMarks(n: number, rnd: () => number): ScoringMark[] {
  return Array.from({ length: n }, () => ({
    id: `00000000-0000-4000-8000-${(counter++).toString(16).padStart(12, '0')}`,
    imageId: '1',
    x: Math.round(rnd() * W * 100) / 100,
    y: Math.round(rnd() * H * 100) / 100,
    classKey: keys[Math.floor(rnd() * keys.length)]!,
    tags: rnd() < 0.1 ? ['distal_droplet'] : [],
  }));
}

// Headless Chromium paces animation frames slowly without a GPU, so the untimed gaps
// between measurements yield to the event loop instead of waiting for frames.
const frame = () => new Promise<void>((r) => setTimeout(r, 4));
const settle = async () => {
  await frame();
  await frame();
};
/** Reading one pixel makes the browser finish rasterising what was drawn. */
let FLUSH = true;
const flushCanvas = (c: Konva.Layer) => {
  if (FLUSH) c.getContext()._context.getImageData(0, 0, 1, 1);
};

/** Pan one step per frame through the real path (panBy → batchDraw) and record rAF-to-rAF intervals. */
async function panIntervals(step: (i: number) => void, frames: number): Promise<number[]> {
  const out: number[] = [];
  let last = 0;
  await new Promise<void>((done) => {
    let i = 0;
    const tick = (ts: number) => {
      if (last) out.push(ts - last);
      last = ts;
      if (i >= frames) return done();
      step(i++);
      requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  });
  return out;
}

let setMarksOut: (m: ScoringMark[]) => void = () => {};
const control: { current: FieldCanvasControl | null } = { current: null };

function App() {
  const [marks, setMarks] = useState<ScoringMark[]>([]);
  useEffect(() => {
    setMarksOut = setMarks;
  }, []);
  return (
    <div style={{ width: 1100, height: 720 }}>
      <FieldCanvas
        image={image}
        marks={marks}
        classes={classes}
        selectedId={null}
        marksVisible
        readOnly={false}
        currentClass={classes.get('normal')!}
        onPlace={() => {}}
        onSelect={() => {}}
        onMove={() => {}}
        controlRef={control}
      />
    </div>
  );
}

async function waitFor(check: () => boolean, what: string) {
  const until = performance.now() + 60_000;
  while (!check()) {
    if (performance.now() > until) throw new Error(`Timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

interface Timings {
  place: number[];
  /** The React commit alone, inside `place`. */
  commit: number[];
  pan: number[];
  /** rAF-to-rAF intervals while panning every frame. */
  panFrames: number[];
}

async function runOurs(nMarks: number, placements: number, panFrames: number, flush: boolean): Promise<Timings> {
  FLUSH = flush;
  const rnd = mulberry32(7 + nMarks);
  let marks = makeMarks(nMarks, rnd);
  flushSync(() => setMarksOut(marks));
  control.current!.fit();
  await settle();
  const stage = control.current!.getStage()!;
  const [, marksLayer] = stage.getLayers() as [Konva.Layer, Konva.Layer, Konva.Layer];
  const place: number[] = [];
  const commit: number[] = [];
  for (let i = 0; i < placements; i++) {
    const [m] = makeMarks(1, rnd);
    const t0 = performance.now();
    // The workbench's path: new array with one more mark → React commit → Konva redraw of the marks layer.
    marks = [...marks, m!];
    flushSync(() => setMarksOut(marks));
    commit.push(performance.now() - t0);
    marksLayer.draw();
    flushCanvas(marksLayer);
    place.push(performance.now() - t0);
    await settle();
  }
  const pan: number[] = [];
  for (let i = 0; i < panFrames; i++) {
    const dx = i % 40 < 20 ? 6 : -6;
    const t0 = performance.now();
    control.current!.panBy(dx, dx / 2);
    stage.draw();
    for (const l of stage.getLayers()) flushCanvas(l);
    pan.push(performance.now() - t0);
    await frame();
  }
  const intervals = await panIntervals((i) => control.current!.panBy(i % 40 < 20 ? 6 : -6, i % 40 < 20 ? 3 : -3), Math.min(panFrames, 40));
  flushSync(() => setMarksOut([]));
  await settle();
  return { place, commit, pan, panFrames: intervals };
}

/** Baseline: plain Konva, no React, one Circle per mark, the full-size image drawn as is. */
async function runPlain(nMarks: number, placements: number, panFrames: number, flush: boolean): Promise<Timings> {
  FLUSH = flush;
  const host = document.createElement('div');
  document.body.appendChild(host);
  const img = new window.Image();
  img.src = '/field.jpg';
  await img.decode();
  const stage = new Konva.Stage({ container: host, width: 1100, height: 720, listening: false });
  const scale = Math.min(1100 / W, 720 / H);
  stage.scale({ x: scale, y: scale });
  const imgLayer = new Konva.Layer({ listening: false });
  imgLayer.add(new Konva.Image({ image: img, width: W, height: H, listening: false }));
  const layer = new Konva.Layer({ listening: false });
  stage.add(imgLayer, layer);
  const rnd = mulberry32(11 + nMarks);
  const add = (m: ScoringMark) =>
    layer.add(
      new Konva.Circle({
        x: m.x,
        y: m.y,
        radius: 9 / scale,
        fill: classes.get(m.classKey)!.colour,
        stroke: '#111820',
        strokeWidth: 1.5,
        strokeScaleEnabled: false,
        listening: false,
        perfectDrawEnabled: false,
        shadowForStrokeEnabled: false,
      }),
    );
  makeMarks(nMarks, rnd).forEach(add);
  stage.draw();
  await settle();
  const place: number[] = [];
  for (let i = 0; i < placements; i++) {
    const [m] = makeMarks(1, rnd);
    const t0 = performance.now();
    add(m!);
    layer.draw();
    flushCanvas(layer);
    place.push(performance.now() - t0);
    await settle();
  }
  const pan: number[] = [];
  for (let i = 0; i < panFrames; i++) {
    const dx = i % 40 < 20 ? 6 : -6;
    const t0 = performance.now();
    stage.position({ x: stage.x() + dx, y: stage.y() + dx / 2 });
    stage.draw();
    flushCanvas(imgLayer);
    flushCanvas(layer);
    pan.push(performance.now() - t0);
    await frame();
  }
  const intervals = await panIntervals((i) => {
    const dx = i % 40 < 20 ? 6 : -6;
    stage.position({ x: stage.x() + dx, y: stage.y() + dx / 2 });
    stage.batchDraw();
  }, Math.min(panFrames, 40));
  stage.destroy();
  host.remove();
  return { place, commit: [], pan, panFrames: intervals };
}

async function ready() {
  await waitFor(() => Boolean(control.current?.getStage()?.findOne('Image')), 'the field image');
}

const root = createRoot(document.getElementById('root')!);
root.render(<App />);
(window as unknown as { __bench: unknown }).__bench = { ready, runOurs, runPlain };
