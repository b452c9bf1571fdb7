// The stored per-meter summaries (derived data the register shows: flags and interval evidence)
// against a fresh computation from the records, for `integrity`: a summary edited outside the
// program, with its generation left matching, would otherwise be shown as it was stored.
import { registerRows } from '../../../db/queries/meters';
import type { IntegrityProblem } from '../contract-records';
import type { ServiceContext } from '../ops/context';
import { registerRowOf } from '../ops/lookups';
import { registerFlagsAll } from './flags';
import { cachedAttributeRecords, forgetSummaries, setSummariesEnabled } from './summaries';

export function summaryProblems(ctx: ServiceContext): IntegrityProblem[] {
  // A check reads: summaries the comparison fills in on the way are rolled back, never kept.
  ctx.db.exec('SAVEPOINT summary_check');
  try {
    return compareSummaries(ctx);
  } finally {
    ctx.db.exec('ROLLBACK TO summary_check');
    ctx.db.exec('RELEASE summary_check');
    forgetSummaries(ctx.db);
  }
}

function compareSummaries(ctx: ServiceContext): IntegrityProblem[] {
  const { db } = ctx;
  const rows = registerRows(db).map((r) => registerRowOf(ctx, r));
  const attributes = (assetId: string) =>
    JSON.stringify(cachedAttributeRecords(db, (g) => g.assetId === assetId).records);
  // What the register would show now, from the summaries stored in the file...
  forgetSummaries(db);
  const shownFlags = registerFlagsAll(ctx, rows);
  const shownAttributes = rows.map((r) => attributes(r.assetId));
  // ...and what the records give.
  setSummariesEnabled(db, false);
  let freshFlags: string[][];
  let freshAttributes: string[];
  try {
    freshFlags = registerFlagsAll(ctx, rows);
    freshAttributes = rows.map((r) => attributes(r.assetId));
  } finally {
    setSummariesEnabled(db, true);
    forgetSummaries(db);
  }
  const problems: IntegrityProblem[] = [];
  rows.forEach((r, i) => {
    const flags = JSON.stringify(shownFlags[i]) !== JSON.stringify(freshFlags[i]);
    if (flags || shownAttributes[i] !== freshAttributes[i])
      problems.push({
        kind: 'summary',
        record: `meter ${r.assetId}`,
        problem: `the stored ${flags ? 'register flags' : 'interval evidence'} of meter ${r.assetId} differ from what its records give: the summary was changed outside the program`,
        affects: `the register's flags and the interval suggestion of ${r.assetId} until the meter next changes`,
      });
  });
  return problems;
}
