import type { MarkerShape } from '@/lib/class-sets/schema';
import { markerPoints } from '@/lib/scoring/shapes';

const OUTLINE = '#1c2430';

/** The class's marker as a small SVG, drawn from the same geometry as the canvas. */
export function MarkerSwatch({ shape, colour, size = 18 }: { shape: MarkerShape; colour: string; size?: number }) {
  const c = size / 2;
  const r = size / 2 - 2;
  const g = markerPoints(shape, c, c, r);
  let body: React.ReactNode;
  if (g.kind === 'circle') {
    body = g.hollow ? (
      <>
        <circle cx={g.x} cy={g.y} r={g.radius - 1} fill="none" stroke={OUTLINE} strokeWidth={4} />
        <circle cx={g.x} cy={g.y} r={g.radius - 1} fill="none" stroke={colour} strokeWidth={2.2} />
      </>
    ) : (
      <circle cx={g.x} cy={g.y} r={g.radius} fill={colour} stroke={OUTLINE} strokeWidth={1.2} />
    );
  } else if (g.kind === 'polygon') {
    const pts: string[] = [];
    for (let i = 0; i < g.points.length; i += 2) pts.push(`${g.points[i]!.toFixed(2)},${g.points[i + 1]!.toFixed(2)}`);
    body = <polygon points={pts.join(' ')} fill={colour} stroke={OUTLINE} strokeWidth={1.2} strokeLinejoin="round" />;
  } else {
    body = (
      <>
        {g.segments.map(([x1, y1, x2, y2], i) => (
          <line key={`o${i}`} x1={x1} y1={y1} x2={x2} y2={y2} stroke={OUTLINE} strokeWidth={4.4} strokeLinecap="round" />
        ))}
        {g.segments.map(([x1, y1, x2, y2], i) => (
          <line key={`c${i}`} x1={x1} y1={y1} x2={x2} y2={y2} stroke={colour} strokeWidth={2.4} strokeLinecap="round" />
        ))}
      </>
    );
  }
  return (
    <svg width={size} height={size} viewBox={`0 0 ${size} ${size}`} aria-hidden="true" focusable="false" className="shrink-0">
      {body}
    </svg>
  );
}
