// The cavity's health over time: the as-found dip depth of each check against the meter's
// minimum dip, and the loaded Q of swept points where sweeps were attached. A fading dip or a
// falling Q tells of a worn plunger or a dirty cavity before the error does.
import { CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, Scatter, XAxis, YAxis } from 'recharts';
import { ChartData, cell } from './ChartData';
import type { TrendReport } from '../../../app/api/contract-history';
import { DAY_MS, dateMs, yearOf, yearTicks } from './timeAxis';
import { useLoad } from '../shared/useLoad';
import { useWidth } from '../shared/useWidth';
import { useLab } from '../lab/LabContext';
import './charts.css';

export function HealthChart({ trend }: { trend: TrendReport }) {
  const api = useLab();
  const [ref, width] = useWidth<HTMLDivElement>(760);
  const [sweeps] = useLoad(() => api.listSweeps(trend.assetId), [api, trend.assetId]);
  const h = trend.health;
  const dip = h.dip.map((d) => ({ t: dateMs(d.date), depthDb: d.minDb }));
  const swept = sweeps.kind === 'ready' ? sweeps.value : [];
  const q = swept.map((s) => ({ t: dateMs(s.date), loadedQ: s.loadedQ }));
  if (dip.length === 0 && q.length === 0)
    return <p className="muted">No dip depths recorded yet: the chart appears once checks note them.</p>;
  const xs = [...dip.map((d) => d.t), ...q.map((p) => p.t)];
  const x0 = Math.min(...xs) - 60 * DAY_MS;
  const x1 = Math.max(...xs) + 60 * DAY_MS;
  const yMax = Math.ceil(Math.max(h.minDipDb * 1.5, ...dip.map((d) => d.depthDb)) * 1.1);
  const yStep = yMax <= 8 ? 1 : yMax <= 20 ? 2 : 5;
  const yTicks = Array.from({ length: Math.floor(yMax / yStep) + 1 }, (_, i) => i * yStep);
  return (
    <figure className="chart health-chart" ref={ref} aria-label="Dip depth and loaded Q against time">
      <div
        className="chart-plot"
        role="img"
        aria-label={`Dip depth${q.length ? ' and loaded Q' : ''} of each check against its date, with the minimum dip of ${h.minDipDb} dB`}
      >
        <ComposedChart
          accessibilityLayer={false}
          width={width}
          height={280}
          margin={{ top: 8, right: 24, bottom: 28, left: 18 }}
        >
          <CartesianGrid strokeDasharray="2 4" stroke="#9aa3ab" strokeOpacity={0.45} />
          <XAxis
            type="number"
            dataKey="t"
            domain={[x0, x1]}
            allowDataOverflow
            ticks={yearTicks(x0, x1)}
            tickFormatter={(v: number) => String(yearOf(v))}
            label={{ value: 'check date / year', position: 'insideBottom', offset: -16 }}
          />
          <YAxis
            yAxisId="db"
            type="number"
            domain={[0, yMax]}
            ticks={yTicks}
            width={64}
            label={{ value: 'dip depth / dB', angle: -90, position: 'insideLeft', offset: 0, dy: 40 }}
          />
          {q.length > 0 && (
            <YAxis
              yAxisId="q"
              orientation="right"
              type="number"
              width={64}
              label={{ value: 'loaded Q (no unit)', angle: 90, position: 'insideRight', offset: 0, dy: 50 }}
            />
          )}
          <ReferenceLine
            yAxisId="db"
            y={h.minDipDb}
            stroke="#8a4b45"
            strokeWidth={1.5}
            strokeDasharray="6 3"
            label={{ value: `minimum dip ${h.minDipDb} dB`, position: 'insideBottomLeft', fontSize: 12 }}
          />
          <Line
            yAxisId="db"
            data={dip}
            dataKey="depthDb"
            name="shallowest as-found dip of each check, dB"
            stroke="#2f5d7c"
            dot={{ r: 3 }}
            isAnimationActive={false}
          />
          {q.length > 0 && (
            <Scatter
              yAxisId="q"
              data={q}
              dataKey="loadedQ"
              name="loaded Q of each swept point"
              fill="#b0600e"
              shape="triangle"
              isAnimationActive={false}
            />
          )}
          <Legend verticalAlign="top" height={30} />
        </ComposedChart>
      </div>
      <figcaption className="chart-caption" data-testid="health-caption">
        Dashed: the meter&apos;s minimum dip, {h.minDipDb} dB; a shallower dip cannot be tuned reliably.{' '}
        {h.dipSlopeDbPerYear !== null && `Dip trend ${h.dipSlopeDbPerYear.toFixed(2)} dB/year. `}
        {h.dipReachesMinimumDate
          ? `⚠ Projected to reach the minimum on ${h.dipReachesMinimumDate}.`
          : 'Not projected to reach the minimum.'}{' '}
        {sweeps.kind === 'ready' && swept.length === 0 && 'No sweeps attached, so no loaded Q to show.'}
        {sweeps.kind === 'failed' && `Sweeps could not be read: ${sweeps.message}`}
      </figcaption>
      <ChartData
        name={'Dip depth and loaded Q against time'}
        table={{
          caption: 'Dip depth and loaded Q by date',
          columns: ['Date', 'Dip depth / dB', 'Loaded Q'],
          rows: [
            ...h.dip.map((d) => [d.date, cell(d.minDb, 1), '—']),
            ...swept.map((s) => [s.date, '—', cell(s.loadedQ, 0)]),
          ].sort((a, b) => String(a[0]).localeCompare(String(b[0]))),
        }}
      />
    </figure>
  );
}
