// A meter's history at a glance: error against time at one check frequency at a time with the
// 95 % prediction band of the next check, the tolerance and the projected exit date; the flags
// the history raises, in words and symbols; and the suggested interval with how it was reached.
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
import type { FrequencyTrend, HistoryFlag, TrendReport } from '../../../app/api/contract-history';
import { HealthChart } from '../charts/HealthChart';
import { formatHzShort, formatPpm } from '../shared/format';
import { DAY_MS, dateMs, yearOf, yearTicks } from '../charts/timeAxis';
import { useLoad } from '../shared/useLoad';
import '../charts/charts.css';
import { useWidth } from '../shared/useWidth';
import { useLab } from '../lab/LabContext';
import { StopIcon } from '../shared/Icons';
import { formatProbability } from '../../../app/model/quantity-format';

/** The stop flag's symbol is drawn (StopIcon): the no-entry character is missing from many fonts. */
export const SEVERITY_LABEL: Record<HistoryFlag['severity'], { symbol: string; word: string }> = {
  stop: { symbol: '', word: 'Stop' },
  warning: { symbol: '⚠', word: 'Warning' },
  info: { symbol: 'ℹ', word: 'Note' },
};

/** The frequency to open on: the one whose band leaves the tolerance first, else the first. */
export function firstToWatch(frequencies: FrequencyTrend[]): number {
  let best = 0;
  frequencies.forEach((f, i) => {
    const b = frequencies[best];
    if (f.projectedExitDate && (!b?.projectedExitDate || f.projectedExitDate < b.projectedExitDate)) best = i;
  });
  return best;
}

export interface TrendRow {
  t: number;
  errorPpm?: number;
  uPpm?: number;
  band?: [number, number];
  predictedPpm?: number;
}

/** One frequency's observations and sampled band as chart rows on the time axis. */
export function trendRows(f: FrequencyTrend): { points: TrendRow[]; band: TrendRow[] } {
  return {
    points: f.history.map((o) => ({ t: dateMs(o.date), errorPpm: o.errorPpm, uPpm: o.uPpm })),
    band: f.band.map((b) => ({
      t: dateMs(b.date),
      predictedPpm: b.predictedPpm,
      band: [b.predictedPpm - b.halfWidthPpm, b.predictedPpm + b.halfWidthPpm],
    })),
  };
}

/** The drift section and the health section of a meter's page, from one getTrend call. */
export function TrendSection({ assetId }: { assetId: string }) {
  const api = useLab();
  const [load] = useLoad(() => api.getTrend(assetId), [api, assetId]);
  if (load.kind === 'loading') return <p className="status">Working out the drift…</p>;
  if (load.kind === 'failed')
    return (
      <p className="status error" role="alert">
        The drift could not be worked out: {load.message}
      </p>
    );
  const t = load.value;
  return (
    <>
      <section aria-labelledby="trend-title">
        <h2 id="trend-title">Drift and suggested interval</h2>
        <Flags flags={t.flags} />
        <IntervalAdviceBox trend={t} />
        {t.frequencies.length === 0 ? (
          <p className="muted">No checks yet: the drift chart appears once checks are recorded.</p>
        ) : (
          <DriftChart trend={t} />
        )}
      </section>
      <section aria-labelledby="health-title">
        <h2 id="health-title">Dip depth and loaded Q over time</h2>
        <HealthChart trend={t} />
      </section>
    </>
  );
}

function Flags({ flags }: { flags: HistoryFlag[] }) {
  if (flags.length === 0)
    return (
      <p className="flags-none" data-testid="flags">
        <span aria-hidden="true">✓</span> No flags: the history raises nothing to act on.
      </p>
    );
  return (
    <ul className="flags" data-testid="flags" aria-label="Flags from the history">
      {flags.map((f, i) => (
        <li key={`${f.code}-${i}`} className={`flag flag-${f.severity}`}>
          <span className="flag-word">
            {f.severity === 'stop' ? (
              <StopIcon />
            ) : (
              <span aria-hidden="true">{SEVERITY_LABEL[f.severity].symbol}</span>
            )}{' '}
            {SEVERITY_LABEL[f.severity].word}
          </span>{' '}
          {f.message}
          {f.date && !f.message.includes(f.date) && <span className="muted"> ({f.date})</span>}
        </li>
      ))}
    </ul>
  );
}

const CHANGE_WORD = {
  longer: '↑ longer than now',
  shorter: '↓ shorter than now',
  same: '= same as now',
} as const;

function IntervalAdviceBox({ trend }: { trend: TrendReport }) {
  const s = trend.suggestion;
  return (
    <div className="advice" data-testid="interval-advice">
      <p className="advice-head">
        Suggested interval: <strong>{s.months} months</strong> ({CHANGE_WORD[s.change]}, {s.currentMonths}{' '}
        months)
        {s.boundedBy && <span> · held at the policy {s.boundedBy}</span>}
      </p>
      <p className="advice-method">Method: {s.methodName}</p>
      <p className="advice-why">{s.rationale}</p>
      <p className="muted advice-note">
        For the coordinator to decide. Certificates{' '}
        {trend.printSuggestedInterval ? 'do print' : 'do not print'} a suggested interval: that is a lab
        setting (Settings).
      </p>
    </div>
  );
}

function DriftChart({ trend }: { trend: TrendReport }) {
  const [ref, width] = useWidth<HTMLDivElement>(760);
  const [index, setIndex] = useState(() => firstToWatch(trend.frequencies));
  const f = trend.frequencies[index] ?? trend.frequencies[0];
  if (!f) return null;
  const { points, band } = trendRows(f);
  const tol = f.tolerancePpm;
  const exitMs = f.projectedExitDate ? dateMs(f.projectedExitDate) : null;
  const dueMs = trend.dueDate ? dateMs(trend.dueDate) : null;
  const xs = [...points.map((p) => p.t), ...band.map((b) => b.t), ...(dueMs ? [dueMs] : [])];
  const x0 = Math.min(...xs) - 60 * DAY_MS;
  const x1 = Math.max(...xs, exitMs ?? -Infinity) + 60 * DAY_MS;
  const ticks = yearTicks(x0, x1);
  const worst = Math.max(
    tol,
    ...points.map((p) => Math.abs(p.errorPpm ?? 0) + (p.uPpm ?? 0)),
    ...band.map((b) => Math.max(Math.abs(b.band?.[0] ?? 0), Math.abs(b.band?.[1] ?? 0))),
  );
  const yMax = roundUp(worst * 1.06);
  return (
    <figure className="chart trend-chart" ref={ref} aria-label="Error against time">
      <div className="chart-tools" role="group" aria-label="Check frequency">
        <span>Check frequency:</span>
        {trend.frequencies.map((g, i) => (
          <button
            key={g.frequencyHz}
            type="button"
            className="toggle"
            aria-pressed={i === index}
            onClick={() => setIndex(i)}
          >
            {formatHzShort(g.frequencyHz)}
            {g.projectedExitDate ? ' ⚠' : ''}
          </button>
        ))}
      </div>
      <ComposedChart width={width} height={340} margin={{ top: 8, right: 24, bottom: 28, left: 18 }}>
        <CartesianGrid strokeDasharray="2 4" stroke="#9aa3ab" strokeOpacity={0.45} />
        <XAxis
          type="number"
          dataKey="t"
          domain={[x0, x1]}
          allowDataOverflow
          ticks={ticks}
          tickFormatter={(v: number) => String(yearOf(v))}
          label={{ value: 'check date / year', position: 'insideBottom', offset: -16 }}
        />
        <YAxis
          type="number"
          domain={[-yMax, yMax]}
          allowDataOverflow
          width={64}
          label={{ value: 'error / ppm', angle: -90, position: 'insideLeft', offset: 0, dy: 30 }}
        />
        <Area
          data={band}
          dataKey="band"
          name="95 % prediction of the next check"
          stroke="none"
          fill="#c9a66b"
          fillOpacity={0.3}
          activeDot={false}
          isAnimationActive={false}
          legendType="rect"
        />
        <Line
          data={band}
          dataKey="predictedPpm"
          name="fitted drift"
          stroke="#8a6a2f"
          strokeDasharray="4 3"
          dot={false}
          activeDot={false}
          isAnimationActive={false}
        />
        <ReferenceLine
          y={tol}
          stroke="#8a4b45"
          strokeWidth={1.5}
          label={{ value: `+${tol.toFixed(0)} ppm tolerance`, position: 'insideTopLeft', fontSize: 12 }}
        />
        <ReferenceLine
          y={-tol}
          stroke="#8a4b45"
          strokeWidth={1.5}
          label={{ value: `−${tol.toFixed(0)} ppm tolerance`, position: 'insideBottomLeft', fontSize: 12 }}
        />
        <ReferenceLine y={0} stroke="#56606b" />
        {dueMs !== null && (
          <ReferenceLine
            x={dueMs}
            stroke="#2f5d7c"
            strokeDasharray="2 3"
            label={{ value: 'due', position: 'insideTopRight', offset: 8, fontSize: 12 }}
          />
        )}
        {exitMs !== null && (
          <ReferenceLine
            x={exitMs}
            stroke="#8a4b45"
            strokeDasharray="6 3"
            label={{
              // The date is in the caption: a long label here would cross the due line.
              value: '⚠ exit',
              position: 'insideBottomRight',
              offset: 10,
              fontSize: 12,
            }}
          />
        )}
        <Scatter
          name="as-found error ± U"
          data={points}
          dataKey="errorPpm"
          fill="#2f5d7c"
          shape="circle"
          isAnimationActive={false}
        >
          <ErrorBar dataKey="uPpm" direction="y" width={4} stroke="#2f5d7c" isAnimationActive={false} />
        </Scatter>
        <Tooltip content={<TrendTip />} />
        <Legend verticalAlign="top" height={30} />
      </ComposedChart>
      <figcaption className="chart-caption" data-testid="trend-caption">
        At {formatHzShort(f.frequencyHz)}: error of each check against its date, ppm, with bars of ±U (about
        95 %). Shaded: where the next check is expected with 95 % probability (NIST/SEMATECH e-Handbook
        4.5.1.2). Solid lines: the tolerance, ±{tol.toFixed(0)} ppm. Dotted: the due date; dashed: the
        projected exit.{' '}
        {f.fit
          ? `Drift ${formatPpm(f.fit.slopePpmPerYear)}/year ± ${f.fit.uSlopePpmPerYear.toFixed(1)} ppm/year from ${f.fit.points} checks since ${f.fit.fromDate}.`
          : 'Too few checks for a drift line.'}{' '}
        {f.projectedExitDate
          ? `Projected to leave the tolerance on ${f.projectedExitDate}.`
          : 'Not projected to leave the tolerance within 30 years.'}
        {f.atDue &&
          ` At the due date ${f.atDue.date}: ${formatPpm(f.atDue.predictedPpm)} ± ${f.atDue.halfWidthPpm.toFixed(1)} ppm, probability of conformity ${formatProbability(f.atDue.probabilityOfConformity)}.`}{' '}
        {trend.pooled && (
          <span className="pooled" data-testid="pooled-drift">
            Pooled drift over {trend.pooled.frequencies} frequencies:{' '}
            {formatPpm(trend.pooled.driftPpmPerYear)}
            /year ± {trend.pooled.uDriftPpmPerYear.toFixed(1)} ppm/year. Earliest projected exit:{' '}
            {trend.projectedExitDate ?? 'none within 30 years'}.
          </span>
        )}
      </figcaption>
    </figure>
  );
}

/** A round axis limit a little above x: 1200 rather than 2000 for 1040. */
export function roundUp(x: number): number {
  if (!(x > 0)) return 1;
  const step = 10 ** Math.floor(Math.log10(x)) / 5;
  return Math.ceil(x / step) * step;
}

/** A probability in per cent, one wording everywhere (app/model/quantity-format). */
export { formatProbability };

function TrendTip({ active, payload }: { active?: boolean; payload?: { payload?: unknown }[] }) {
  const p = payload?.find((x) => x.payload && typeof (x.payload as TrendRow).errorPpm === 'number')
    ?.payload as TrendRow | undefined;
  if (!active || !p || p.errorPpm === undefined) return null;
  return (
    <div className="chart-tip">
      <div>{new Date(p.t).toISOString().slice(0, 10)}</div>
      <div>error {formatPpm(p.errorPpm)}</div>
      <div>U ±{(p.uPpm ?? 0).toFixed(1)} ppm</div>
    </div>
  );
}
