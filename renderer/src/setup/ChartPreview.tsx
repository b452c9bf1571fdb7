// The chart of a micrometer meter as it will be saved: frequency against divisions, drawn before
// anything is written so a mistyped row shows as a kink.
import type { ChartRow } from './chartRows';
import { previewHz } from './chartRows';

const W = 320;
const H = 160;
const PAD = 28;

export function ChartPreview({ rows }: { rows: ChartRow[] }) {
  const pts = rows
    .map((r) => ({ d: r.divisions, f: previewHz(r.frequency) }))
    .filter((p) => Number.isFinite(p.f))
    .sort((a, b) => a.d - b.d);
  if (pts.length < 2) return <p className="muted">The chart shows here once two rows are given.</p>;
  const dMin = Math.min(...pts.map((p) => p.d));
  const dMax = Math.max(...pts.map((p) => p.d));
  const fMin = Math.min(...pts.map((p) => p.f));
  const fMax = Math.max(...pts.map((p) => p.f));
  const x = (d: number) => PAD + ((d - dMin) / (dMax - dMin || 1)) * (W - 2 * PAD);
  const y = (f: number) => H - PAD - ((f - fMin) / (fMax - fMin || 1)) * (H - 2 * PAD);
  const ghz = (f: number) => `${(f / 1e9).toPrecision(4)} GHz`;
  return (
    <figure className="chart-preview">
      <svg
        width={W}
        height={H}
        role="img"
        aria-label={`Dial chart, ${pts.length} rows: ${ghz(pts[0]!.f)} at ${pts[0]!.d} div to ${ghz(pts[pts.length - 1]!.f)} at ${pts[pts.length - 1]!.d} div`}
      >
        <polyline
          fill="none"
          stroke="currentColor"
          strokeWidth="1.5"
          points={pts.map((p) => `${x(p.d)},${y(p.f)}`).join(' ')}
        />
        {pts.map((p) => (
          <circle key={p.d} data-testid="chart-point" cx={x(p.d)} cy={y(p.f)} r="3" />
        ))}
        <text x={PAD} y={H - 6} fontSize="10">
          {dMin} div
        </text>
        <text x={W - PAD} y={H - 6} fontSize="10" textAnchor="end">
          {dMax} div
        </text>
        <text x={2} y={PAD - 8} fontSize="10">
          {ghz(fMax)}
        </text>
      </svg>
      <figcaption className="muted">Frequency against dial divisions, as it will be saved.</figcaption>
    </figure>
  );
}
