// The coverage strip of the register: the lab's band coverage as the service's `coverage`
// operation reports it, laid along a logarithmic frequency axis from 1 to 110 GHz, so a gap in
// the bands, or a band held only by a quarantined, withdrawn or overdue meter, is seen at a
// glance. Each stretch is named in words below the drawing, not only by its fill.
import { memo } from 'react';
import type { RegisterRow } from '../../../app/api/contract';
import type { CoverageReport } from '../../../app/api/contract-history';
import {
  COVERAGE_MAX_HZ,
  COVERAGE_MIN_HZ,
  logPosition,
  notUsableBecause,
  packLanes,
  stripSegments,
} from './coverage';
import type { CoverageKind } from './coverage';
import { formatBand } from '../shared/format';
import { effectiveDue } from './registerFilters';
import { useWidth } from '../shared/useWidth';
import './coverage.css';

const TICKS_GHZ = [1, 2, 5, 10, 20, 50, 110];
const MINOR_GHZ = [3, 4, 6, 7, 8, 9, 30, 40, 60, 70, 80, 90];
/** Drawing lanes per meter is useful for a bench, not for thousands of meters. */
const MAX_LANE_METERS = 40;

export const COVERAGE_WORDS: Record<CoverageKind, { symbol: string; word: string }> = {
  usable: { symbol: '■', word: 'covered by a meter in service and in date' },
  unusable: {
    symbol: '▨',
    word: 'only meters not usable now (quarantined, withdrawn, overdue or never checked)',
  },
  gap: { symbol: '□', word: 'gap: no meter' },
};

/** A meter in service whose check has lapsed is drawn like a quarantined one: it is not usable. */
function laneClass(r: RegisterRow): string {
  if (r.state !== 'in-service') return `lane lane-${r.state}`;
  return r.daysToDue === null || effectiveDue(r) === 'overdue' ? 'lane lane-lapsed' : 'lane lane-in-service';
}

function laneMark(r: RegisterRow): string {
  if (r.state === 'quarantined') return ' ◆';
  if (r.state === 'withdrawn') return ' ○';
  return laneClass(r) === 'lane lane-lapsed' ? ' ⚠' : '';
}

/** Memoised: the register re-renders on every filter keystroke, the strip only on new data. */
export const CoverageStrip = memo(function CoverageStrip({
  report,
  rows,
}: {
  report: CoverageReport;
  rows: RegisterRow[];
}) {
  const [ref, width] = useWidth<HTMLDivElement>(960);
  const segments = stripSegments(report);
  const byId = new Map(rows.map((r) => [r.assetId, r]));
  const named = (ids: string[]) =>
    ids
      .map((id) => {
        const why = notUsableBecause(byId.get(id));
        return why ? `${id} ${why}` : id;
      })
      .join(', ');
  const pad = 14;
  const inner = Math.max(200, width - 2 * pad);
  const x = (hz: number) => pad + logPosition(hz) * inner;
  const stripTop = 4;
  const stripHeight = 22;
  const inRange = rows.filter((r) => r.maxHz > COVERAGE_MIN_HZ && r.minHz < COVERAGE_MAX_HZ);
  const lanes = inRange.length <= MAX_LANE_METERS ? packLanes(inRange) : [];
  const laneTop = stripTop + stripHeight + 6;
  const laneHeight = 15;
  const axisY = laneTop + lanes.length * laneHeight + 4;
  const height = axisY + 34;
  const gaps = segments.filter((s) => s.kind === 'gap');
  const unusable = segments.filter((s) => s.kind === 'unusable');

  return (
    <section className="coverage" aria-labelledby="coverage-title">
      <h2 id="coverage-title">Band coverage, 1 to 110 GHz, as of {report.asOf}</h2>
      <div ref={ref} className="coverage-drawing">
        <svg
          width={width}
          height={height}
          role="img"
          aria-label="Band coverage of the lab's meters on a logarithmic frequency axis"
        >
          <defs>
            <pattern
              id="coverage-hatch"
              width="6"
              height="6"
              patternUnits="userSpaceOnUse"
              patternTransform="rotate(45)"
            >
              <rect width="6" height="6" className="hatch-bg" />
              <line x1="0" y1="0" x2="0" y2="6" className="hatch-line" />
            </pattern>
          </defs>
          {segments.map((s) => (
            <g key={`${s.fromHz}-${s.kind}`} className={`seg seg-${s.kind}`} data-kind={s.kind}>
              <rect
                x={x(s.fromHz)}
                y={stripTop}
                width={Math.max(1, x(s.toHz) - x(s.fromHz))}
                height={stripHeight}
                fill={s.kind === 'unusable' ? 'url(#coverage-hatch)' : undefined}
              >
                <title>{`${formatBand(s.fromHz, s.toHz)}: ${COVERAGE_WORDS[s.kind].word}${s.meters.length ? ` (${s.kind === 'usable' ? s.meters.join(', ') : named(s.meters)})` : ''}`}</title>
              </rect>
              {s.kind === 'gap' && (
                <text
                  x={(x(s.fromHz) + x(s.toHz)) / 2}
                  y={stripTop + stripHeight + 0.5}
                  className="gap-mark"
                  textAnchor="middle"
                >
                  ▲
                </text>
              )}
            </g>
          ))}
          {lanes.map((lane, i) =>
            lane.map((r) => {
              const x0 = x(r.minHz);
              const w = Math.max(2, x(r.maxHz) - x0);
              return (
                <g key={r.assetId} className={laneClass(r)}>
                  <rect
                    x={x0 + 1}
                    y={laneTop + i * laneHeight}
                    width={w - 2}
                    height={laneHeight - 3}
                    rx={2}
                  />
                  {w > r.assetId.length * 6.4 + 6 && (
                    <text x={x0 + w / 2} y={laneTop + i * laneHeight + 9.5} textAnchor="middle">
                      {r.assetId}
                      {laneMark(r)}
                    </text>
                  )}
                  <title>{`${r.assetId}: ${formatBand(r.minHz, r.maxHz)}, ${r.state}${laneClass(r).endsWith('lapsed') ? ', not in date' : ''}`}</title>
                </g>
              );
            }),
          )}
          <line x1={pad} x2={pad + inner} y1={axisY} y2={axisY} className="axis" />
          {MINOR_GHZ.map((g) => (
            <line key={g} x1={x(g * 1e9)} x2={x(g * 1e9)} y1={axisY} y2={axisY + 3} className="axis" />
          ))}
          {TICKS_GHZ.map((g) => (
            <g key={g}>
              <line x1={x(g * 1e9)} x2={x(g * 1e9)} y1={stripTop} y2={axisY + 5} className="gridline" />
              <text x={x(g * 1e9)} y={axisY + 16} textAnchor="middle" className="tick">
                {g}
              </text>
            </g>
          ))}
          <text x={pad + inner} y={axisY + 30} textAnchor="end" className="axis-title">
            frequency / GHz (logarithmic)
          </text>
        </svg>
      </div>
      <ul className="coverage-legend">
        {(['usable', 'unusable', 'gap'] as const).map((k) => (
          <li key={k} className={`key key-${k}`}>
            <span aria-hidden="true">{COVERAGE_WORDS[k].symbol}</span> {COVERAGE_WORDS[k].word}
          </li>
        ))}
      </ul>
      <p className="coverage-text" data-testid="coverage-gaps">
        {gaps.length === 0 ? (
          <>
            <span aria-hidden="true">✓ </span>No gaps: every frequency from 1 to 110 GHz has a meter.
          </>
        ) : (
          <>
            <strong>
              <span aria-hidden="true">▲ </span>
              {gaps.length === 1 ? 'Gap' : `${gaps.length} gaps`}:
            </strong>{' '}
            {gaps.map((g) => formatBand(g.fromHz, g.toHz)).join(', ')}.
          </>
        )}
        {unusable.length > 0 && (
          <>
            {' '}
            <strong>
              <span aria-hidden="true">▨ </span>Not usable now:
            </strong>{' '}
            {unusable.map((u) => `${formatBand(u.fromHz, u.toHz)} (${named(u.meters)})`).join(', ')}.
          </>
        )}
      </p>
    </section>
  );
});
