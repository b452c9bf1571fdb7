// One swept trace with its fitted dip drawn over it: level in dB against the fitted baseline, offset
// from the fitted f0 in MHz, so the technician sees at once whether the fit sits on the dip.
import { CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, Scatter, XAxis, YAxis } from 'recharts';
import type { TraceFit } from '../../app/api/contract-sweep';
import { formatHz } from './format';
import { useWidth } from './useWidth';

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
  return (
    <figure className="chart dip-chart" ref={ref} aria-label={`Swept trace ${name} with the fitted dip`}>
      <ComposedChart width={width} height={240} margin={{ top: 8, right: 16, bottom: 28, left: 12 }}>
        <CartesianGrid strokeDasharray="2 4" stroke="#9aa3ab" strokeOpacity={0.45} />
        <XAxis
          type="number"
          dataKey="dfMHz"
          domain={['dataMin', 'dataMax']}
          tickFormatter={(v: number) => v.toFixed(2)}
          label={{ value: `offset from f0 / MHz`, position: 'insideBottom', offset: -16 }}
        />
        <YAxis
          type="number"
          domain={[Math.floor((low - pad) * 10) / 10, Math.ceil((high + pad) * 10) / 10]}
          tickFormatter={(v: number) => v.toFixed(1)}
          width={56}
          label={{ value: 'level / dB', angle: -90, position: 'insideLeft', offset: 4, dy: 30 }}
        />
        <ReferenceLine x={0} stroke="#8a4b45" strokeDasharray="6 3" />
        <Scatter
          data={rows}
          dataKey="measuredDb"
          name="measured"
          fill="#2f5d7c"
          shape="circle"
          legendType="circle"
          isAnimationActive={false}
          r={1.5}
        />
        <Line
          data={rows}
          dataKey="fittedDb"
          name="fitted dip"
          stroke="#b0600e"
          strokeWidth={2}
          dot={false}
          isAnimationActive={false}
        />
        <Legend verticalAlign="top" height={26} />
      </ComposedChart>
      <figcaption className="chart-caption" data-testid="dip-caption">
        f0 = {formatHz(m.f0Hz, 6)} (u = {formatHz(m.f0UncertaintyHz, 1)}), loaded Q = {Math.round(m.loadedQ)},
        depth = {m.depthDb.toFixed(2)} dB, {m.pointsPerLinewidth} points across the half-depth width
        {fit.report.spurious.length > 0 && ` · ⚠ ${fit.report.spurious.length} spurious dip(s)`}.
      </figcaption>
    </figure>
  );
}
