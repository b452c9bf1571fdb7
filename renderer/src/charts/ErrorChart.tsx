// Error against frequency for a meter's newest checks: each point's error with its expanded
// uncertainty U as a bar, inside the tolerance band of the stated accuracy. Checks differ by
// marker shape as well as colour, and the legend names each by date.
import { useState } from 'react';
import {
  Area,
  CartesianGrid,
  ComposedChart,
  ErrorBar,
  Legend,
  Line,
  ReferenceLine,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { CheckRecord, Meter } from '../../../app/api/contract';
import type { Phase } from '../../../app/engine/model';
import { VERDICT_LABEL, formatPpm, tolerancePpm } from '../shared/format';
import { useWidth } from '../shared/useWidth';
import './charts.css';
import { decimal, plain, roundTicks } from '../../../app/model/quantity-format';

/** Mid-tone colours readable on light and dark paper; shapes carry the same distinction. */
const SERIES = [
  { color: '#2f5d7c', shape: 'circle' },
  { color: '#b0600e', shape: 'triangle' },
  { color: '#4f7a2a', shape: 'square' },
  { color: '#7b4a91', shape: 'diamond' },
] as const;

export interface ErrorPoint {
  frequencyGhz: number;
  errorPpm: number;
  uPpm: number;
  verdict: string;
}

export interface ErrorSeries {
  name: string;
  points: ErrorPoint[];
}

/** One series per check (and per phase when the meter was adjusted), newest first. */
export function errorSeries(checks: CheckRecord[]): ErrorSeries[] {
  const out: ErrorSeries[] = [];
  for (const c of checks) {
    const phases: Phase[] = c.points.some((p) => p.phase === 'as-left')
      ? ['as-found', 'as-left']
      : ['as-found'];
    for (const phase of phases) {
      const points = c.points
        .filter((p) => p.phase === phase)
        .map((p) => ({
          frequencyGhz: p.referenceHz / 1e9,
          errorPpm: p.result.errorPpm,
          uPpm: p.result.expandedPpm,
          verdict: VERDICT_LABEL[p.result.decision.verdict].word,
        }));
      out.push({ name: phases.length > 1 ? `${c.date}, ${phase.replace('-', ' ')}` : c.date, points });
    }
  }
  return out;
}

/** Ticks at round values, 1, 2 or 5 × 10ⁿ apart, across [lo, hi]. */
export function niceTicks(lo: number, hi: number, target = 8): number[] {
  return roundTicks(lo, hi, target);
}

export function ErrorChart({ meter, checks }: { meter: Meter; checks: CheckRecord[] }) {
  const [ref, width] = useWidth<HTMLDivElement>(760);
  const [scale, setScale] = useState<'auto' | 'tolerance' | 'data'>('auto');
  // Oldest first, so the newest check is drawn on top and the legend reads in time order.
  const series = errorSeries(checks).slice(0, SERIES.length).reverse();
  const lo = meter.minHz / 1e9;
  const hi = meter.maxHz / 1e9;
  // A little room either side so points at the band edges are not cut in half.
  const pad = (hi - lo) * 0.03;
  const band = Array.from({ length: 41 }, (_, i) => {
    const f = lo + ((hi - lo) * i) / 40;
    const t = tolerancePpm(meter.accuracyRelPpm, meter.accuracyAbsHz, f * 1e9);
    return { frequencyGhz: f, band: [-t, t] as [number, number], upper: t, lower: -t };
  });
  const tMax = Math.max(...band.map((b) => b.upper));
  const worst = Math.max(0, ...series.flatMap((s) => s.points.map((p) => Math.abs(p.errorPpm) + p.uPpm)));
  // Errors far inside the tolerance would sit on one line at the tolerance's scale: then the
  // chart opens scaled to the data, and says where the limits are.
  const dataFits = worst * 1.3 < tMax;
  const mode = scale === 'auto' ? (dataFits ? 'data' : 'tolerance') : scale;
  const yMax = mode === 'data' && dataFits ? niceCeil(worst * 1.3) : niceCeil(Math.max(tMax, worst) * 1.12);
  const limitsHidden = yMax < tMax;

  if (series.length === 0 || series.every((s) => s.points.length === 0)) {
    return <p className="muted">No checks yet: the chart appears once a check is recorded.</p>;
  }

  return (
    <figure className="chart" ref={ref} aria-label="Error against frequency">
      {dataFits && (
        <div className="chart-tools" role="group" aria-label="Vertical scale">
          <span>Vertical scale:</span>
          <button
            type="button"
            className="toggle"
            aria-pressed={mode === 'data'}
            onClick={() => setScale('data')}
          >
            to the errors
          </button>
          <button
            type="button"
            className="toggle"
            aria-pressed={mode === 'tolerance'}
            onClick={() => setScale('tolerance')}
          >
            to the tolerance
          </button>
        </div>
      )}
      <ComposedChart width={width} height={340} margin={{ top: 8, right: 24, bottom: 28, left: 18 }}>
        <CartesianGrid strokeDasharray="2 4" stroke="#9aa3ab" strokeOpacity={0.45} />
        <XAxis
          type="number"
          dataKey="frequencyGhz"
          domain={[lo - pad, hi + pad]}
          allowDataOverflow
          ticks={niceTicks(lo, hi, 10)}
          tickFormatter={(v: number) => plain(v, 6)}
          label={{ value: 'reference frequency / GHz', position: 'insideBottom', offset: -16 }}
        />
        <YAxis
          type="number"
          domain={[-yMax, yMax]}
          allowDataOverflow
          ticks={roundTicks(-yMax, yMax, 8)}
          tickFormatter={(v: number) => plain(v, 6)}
          width={64}
          label={{ value: 'error / ppm', angle: -90, position: 'insideLeft', offset: 0, dy: 30 }}
        />
        <Area
          data={band}
          dataKey="band"
          name={`tolerance ±${meter.accuracyRelPpm} ppm`}
          stroke="none"
          fill="#8fb3cc"
          fillOpacity={0.22}
          activeDot={false}
          isAnimationActive={false}
          legendType="rect"
        />
        <Line
          data={band}
          dataKey="upper"
          stroke="#8a4b45"
          strokeDasharray="6 3"
          dot={false}
          activeDot={false}
          isAnimationActive={false}
          legendType="none"
          name="upper tolerance limit"
        />
        <Line
          data={band}
          dataKey="lower"
          stroke="#8a4b45"
          strokeDasharray="6 3"
          dot={false}
          activeDot={false}
          isAnimationActive={false}
          legendType="none"
          name="lower tolerance limit"
        />
        <ReferenceLine y={0} stroke="#56606b" />
        {series.map((s, i) => {
          // The newest check keeps the first look, whatever the number of checks shown.
          const look = SERIES[series.length - 1 - i] ?? SERIES[0];
          return (
            <Scatter
              key={s.name}
              name={s.name}
              data={s.points}
              dataKey="errorPpm"
              fill={look.color}
              shape={look.shape}
              line={{ stroke: look.color, strokeOpacity: 0.5 }}
              isAnimationActive={false}
            >
              <ErrorBar
                dataKey="uPpm"
                direction="y"
                width={5}
                stroke={look.color}
                strokeWidth={1.2}
                isAnimationActive={false}
              />
            </Scatter>
          );
        })}
        <Tooltip content={<PointTip />} />
        <Legend verticalAlign="top" height={30} />
      </ComposedChart>
      <figcaption className="chart-caption">
        Error of the corrected reading against the reference, ppm, with bars of ±U (expanded uncertainty,
        about 95 %). Shaded: tolerance of the stated accuracy; dashed: its limits.
        {limitsHidden && (
          <strong data-testid="limits-hidden">
            {' '}
            The tolerance limits, ±{decimal(tMax, 0)} ppm, lie beyond this scale: every error shown is inside
            them.
          </strong>
        )}
      </figcaption>
    </figure>
  );
}

function PointTip({ active, payload }: { active?: boolean; payload?: { payload?: unknown }[] }) {
  const p = payload?.find((x) => x.payload && typeof (x.payload as ErrorPoint).uPpm === 'number')?.payload as
    ErrorPoint | undefined;
  if (!active || !p) return null;
  return (
    <div className="chart-tip">
      <div>{p.frequencyGhz.toFixed(3)} GHz</div>
      <div>error {formatPpm(p.errorPpm)}</div>
      <div>U ±{p.uPpm.toFixed(1)} ppm</div>
      <div>{p.verdict}</div>
    </div>
  );
}

/** A round axis limit: 1, 2 or 5 times a power of ten. */
export function niceCeil(x: number): number {
  if (!(x > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 5, 10]) if (m * p >= x) return m * p;
  return 10 * p;
}
