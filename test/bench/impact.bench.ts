// Impact of a standard found off, at fleet scale: the synthetic fleet of fleet-data.ts (2,000
// meters x 25 yearly checks) imported into a temporary lab file; then `standardImpact` for one
// standard over the window in which it was used in 10,000 checks, against the engine alone
// judging the same points again from results already in memory (both in this run, median of 3).
// Target: the operation takes at most twice the engine's time; the figure is 2 x engine / impact
// (floor 1). DIPLEDGER_BENCH_METERS=100 gives a quick run; the target is for 2,000.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { openApi } from '../../app/api/open';
import { rejudgePoint, type ReferenceDeviation } from '../../app/engine';
import { checksNamingStandard } from '../../db/queries/impact';
import { getStandardByAsset } from '../../db/queries/standards';
import { openLabDb } from '../../db/store';
import { clock } from '../fixtures/lab';
import { createFleet, historyCsv } from './fleet-data';
import type { BenchFigure } from './run';

const METERS = Number(process.env.DIPLEDGER_BENCH_METERS ?? 2000);
const BATCH = 20;
/** Over the last 15 of the 25 years each meter used SYN-1 in exactly 5 checks: 2,000 x 5. */
const SINCE = '2012-01-01';
const STANDARD = 'SYN-1';
const ERROR = '0.5 ppm';

const log = (text: string) => process.stderr.write(`impact: ${text}\n`);

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
}

export async function figures(): Promise<BenchFigure[]> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-bench-impact-'));
  const file = path.join(dir, 'fleet.dipledger');
  const lab = openApi(file, { create: true, clock });
  try {
    await createFleet(lab.api, METERS);
    for (let from = 0; from < METERS; from += BATCH)
      await lab.api.importCsv(historyCsv(from, Math.min(METERS, from + BATCH)).csv);
    log(`fleet of ${METERS} meters imported`);

    // The points as the engine gets them, read and decoded outside the timer.
    const reader = openLabDb(file, { readonly: true });
    const standard = getStandardByAsset(reader, STANDARD);
    if (!standard) throw new Error(`${STANDARD} missing`);
    const rows = checksNamingStandard(reader, standard.id, SINCE, clock.today());
    reader.close();
    const points = rows.flatMap((c) => c.points.filter((p) => p.result !== null));
    const deviation: ReferenceDeviation = {
      unit: 'ppm',
      value: 0.5,
      standardUncertainty: (standard.certificates[0]?.expandedUncertaintyPpm ?? 0) / 2,
    };
    const engineRun = (): number => {
      const t = performance.now();
      let changed = 0;
      for (const p of points)
        if (p.result && rejudgePoint(p.result, p.referenceHz, deviation).verdictChanged) changed++;
      const ms = performance.now() - t;
      if (changed < 0) throw new Error('unreachable');
      return ms;
    };
    const impactRun = async (): Promise<{ ms: number; checks: number; judged: number }> => {
      const t = performance.now();
      const r = await lab.api.standardImpact({ standard: STANDARD, error: ERROR, since: SINCE });
      return { ms: performance.now() - t, checks: r.checks.length, judged: r.pointsJudged };
    };
    engineRun(); // warm both paths once
    const first = await impactRun();
    const engine: number[] = [];
    const impact: number[] = [];
    for (let i = 0; i < 3; i++) {
      engine.push(engineRun());
      impact.push((await impactRun()).ms);
    }
    const engineMs = median(engine);
    const impactMs = median(impact);
    log(
      `${first.checks} checks, ${first.judged} points: impact ${impactMs.toFixed(0)} ms, engine alone ${engineMs.toFixed(0)} ms (${(impactMs / engineMs).toFixed(2)} x)`,
    );
    return [
      {
        name: `standardImpact over ${first.checks} checks: 2 x engine re-judge / impact (target >= 1)`,
        value: (2 * engineMs) / impactMs,
        floor: 1,
      },
    ];
  } finally {
    lab.close();
    rmSync(dir, { recursive: true, force: true });
  }
}
