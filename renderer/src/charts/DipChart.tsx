// One swept trace with its fitted dip drawn over it: level in dB against the fitted baseline, offset
// from the fitted f0 in MHz, so the technician sees at once whether the fit sits on the dip.
import { CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, Scatter, XAxis, YAxis } from 'recharts';
import { ChartData, cell } from './ChartData';
import type { TraceFit } from '../../../app/api/contract-sweep';
import { formatHz } from '../shared/format';
import { useWidth } from '../shared/useWidth';
import './charts.css';

export function DipChart({ fit, name }: { fit: TraceFit; name: string }) {
  const [ref, width] = useWidth<HTMLDivElement>(520);
  const m = fit.report.main;
  const rows = fit.plot.frequencyHz.map((f, i) => ({
    dfMHz: (f - m.f0Hz) / 1e6,
    measuredDb: fit.plot.measuredDb[i],
    fittedDb: fit.plot.fittedDb[i],
  }));
  const low = Math.min(...fit.plot.measuredDb, ...fit.plot.fittedDb);
  const high = Math.max(...fit.plot.measuredDb, ...fit.plot.fittedDb);
  const pad = Math.max(0.1, (high - low) * 0.1);
  const span = Math.max(...rows.map((r) => Math.abs(r.dfMHz)));
  const xTicks = niceTicks(-span, span, 7);
  const yTicks = niceTicks(low - pad, high + pad, 6);
  return (
    <figure className="chart dip-chart" ref={ref} aria-label={`Swept trace ${name} with the fitted dip`}>
      <div
        className="chart-plot"
        role="img"
        aria-label={`Measured transmission of the swept trace ${name} against offset from the fitted resonance ${(m.f0Hz / 1e9).toFixed(6)} GHz, with the fitted dip`}
      >
        <ComposedChart
          accessibilityLayer={false}
          width={width}
          height={240}
          margin={{ top: 8, right: 16, bottom: 28, left: 12 }}
        >
          <CartesianGrid strokeDasharray="2 4" stroke="#9aa3ab" strokeOpacity={0.45} />
          <XAxis
            type="number"
            dataKey="dfMHz"
            domain={[xTicks[0] ?? -span, xTicks.at(-1) ?? span]}
            ticks={xTicks}
            tickFormatter={(v: number) => trimNumber(v)}
            label={{ value: `offset from f0 / MHz`, position: 'insideBottom', offset: -16 }}
          />
          <YAxis
            type="number"
            domain={[yTicks[0] ?? low, yTicks.at(-1) ?? high]}
            ticks={yTicks}
            tickFormatter={(v: number) => trimNumber(v)}
            width={56}
            label={{ value: 'level / dB', angle: -90, position: 'insideLeft', offset: 4, dy: 30 }}
          />
          <ReferenceLine x={0} stroke="#8a4b45" strokeDasharray="6 3" />
          <Scatter
            data={rows}
            dataKey="measuredDb"
            name="measured"
            fill="#2f5d7c"
            // Small dots, so the fitted curve drawn over them stays visible.
            shape={(props: { cx?: number; cy?: number }) => (
              <circle cx={props.cx} cy={props.cy} r={1.6} fill="#2f5d7c" fillOpacity={0.55} />
            )}
            legendType="circle"
            isAnimationActive={false}
          />
          <Line
            data={rows}
            dataKey="fittedDb"
            name="fitted dip"
            stroke="#c0392b"
            strokeWidth={2.5}
            dot={false}
            isAnimationActive={false}
          />
          <Legend verticalAlign="top" height={26} />
        </ComposedChart>
      </div>
      <figcaption className="chart-caption" data-testid="dip-caption">
        f0 = {formatHz(m.f0Hz, 6)} (u = {formatHz(m.f0UncertaintyHz, 1)}), loaded Q = {Math.round(m.loadedQ)},
        depth = {m.depthDb.toFixed(2)} dB, {m.pointsPerLinewidth} points across the half-depth width
        {fit.report.spurious.length > 0 && ` · ⚠ ${fit.report.spurious.length} spurious dip(s)`}.
      </figcaption>
      <ChartData
        name={`Swept trace ${name}`}
        table={{
          caption: `Swept trace ${name}: measured and fitted, by offset from ${(m.f0Hz / 1e9).toFixed(6)} GHz`,
          columns: ['Offset / MHz', 'Measured / dB', 'Fitted / dB'],
          rows: rows.map((r) => [cell(r.dfMHz, 4), cell(r.measuredDb, 2), cell(r.fittedDb, 2)]),
        }}
      />
    </figure>
  );
}

/** Round steps (1, 2 or 5 times a power of ten) covering [low, high]. */
export function niceTicks(low: number, high: number, count: number): number[] {
  const raw = (high - low) / Math.max(1, count - 1);
  if (!(raw > 0) || !Number.isFinite(raw)) return [low, high];
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = ([1, 2, 5, 10].find((m) => m * mag >= raw) ?? 10) * mag;
  const first = Math.floor(low / step) * step;
  const ticks: number[] = [];
  for (let t = first; t <= high + step * 1e-9; t += step) ticks.push(Number(t.toPrecision(12)));
  if ((ticks.at(-1) ?? -Infinity) < high) ticks.push(Number((first + ticks.length * step).toPrecision(12)));
  return ticks;
}

function trimNumber(v: number): string {
  return String(Number(v.toPrecision(6))).replace('-', '−');
}
