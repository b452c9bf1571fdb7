// The register's flag words of each meter, from the per-meter summaries where current.
import { getMeterByAsset } from '../../../db/queries/meters';
import type { RegisterRow } from '../contract';
import type { ServiceContext } from '../ops/context';
import { analyseMeter, driftExitSeverity, timeline, type MeterAnalysis } from './analysis';
import { cachedRegisterFlags, type FlagSummary, type FlagWord } from './summaries';

/** Short words for the register (warnings and stops only), used by the due list. */
export function registerFlags(ctx: ServiceContext, row: RegisterRow): string[] {
  return registerFlagsAll(ctx, [row])[0] ?? [];
}

/** Register flag words of many rows at once, from the per-meter summaries where current. */
export function registerFlagsAll(ctx: ServiceContext, rows: RegisterRow[]): string[][] {
  const today = ctx.clock.today();
  return cachedRegisterFlags(
    ctx,
    rows,
    (_meterId, row) => {
      const rec = getMeterByAsset(ctx.db, row.assetId);
      return rec ? flagSummary(analyseMeter(ctx, rec, row)) : { epoch: null, words: [] };
    },
    (summary) => registerWords(summary, today),
  );
}

/** The flags of an analysis that the register shows on some day (warnings and stops), without
 * the day: the drift-exit word keeps its date unless it is a warning whatever the day. */
function flagSummary(a: MeterAnalysis): FlagSummary {
  const words: FlagWord[] = [];
  for (const f of a.flags) {
    if (f.code === 'drift-exit' && !a.exitBeforeDue && f.date !== null)
      words.push({ short: f.short, exitDate: f.date });
    else if (f.severity !== 'info') words.push({ short: f.short });
  }
  return { epoch: a.tl?.epoch ?? null, words };
}

/** The register's words of a flag summary on `today` (analyseMeter's severities on that day). */
function registerWords(summary: FlagSummary, today: string): string[] {
  const tl = summary.epoch === null ? null : timeline(summary.epoch);
  return summary.words
    .filter(
      (w) => w.exitDate === undefined || (tl && driftExitSeverity(tl, w.exitDate, false, today) !== 'info'),
    )
    .map((w) => w.short);
}
