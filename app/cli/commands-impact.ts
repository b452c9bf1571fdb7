// What a reference found off touched: `impact STANDARD --error QTY [--uncertainty QTY] [--since
// DATE]` judges again every check made with the standard; `impact METER` lists a meter's logged
// uses since its last passing check when its newest check found it off. Thin: one LabApi call.
import type { MeterImpact, StandardImpact } from '../api/contract-impact';
import { formatFrequency } from '../engine';
import type { CommandGroup } from './command';
import { fmtPpm, table, verdictWord } from './format';

export function standardImpactText(r: StandardImpact): string {
  const unit = r.deviation.unit === 'ppm' ? 'ppm' : 'Hz';
  const lines = [
    `impact of ${r.standard} off by ${r.deviation.value} ${unit} (u = ${r.deviation.standardUncertainty} ${unit}), checks from ${r.since} to ${r.until}`,
    `${r.checks.length} check(s), ${r.pointsJudged} point(s) judged again, ${r.pointsChanged} verdict(s) changed in ${r.checksChanged} check(s)`,
    '',
  ];
  const rows: string[][] = [];
  for (const c of r.checks)
    for (const p of c.points) {
      if (!p.usedStandard) continue;
      rows.push([
        String(c.checkId),
        c.assetId,
        c.date,
        formatFrequency(p.referenceHz, 5),
        `${fmtPpm(p.before.errorPpm)} ${verdictWord(p.before.verdict)}`,
        `${fmtPpm(p.after.errorPpm)} ${verdictWord(p.after.verdict)}`,
        p.verdictChanged ? 'CHANGED' : '',
      ]);
    }
  if (rows.length) lines.push(table(['check', 'meter', 'date', 'reference', 'before', 'after', ''], rows));
  if (r.meters.length) {
    lines.push('');
    lines.push(
      table(
        ['meter', 'state', 'due', 'state holds', 'due date holds', 'why'],
        r.meters.map((m) => [
          m.assetId,
          m.state,
          m.dueDate ?? '-',
          m.stateHolds ? 'yes' : 'NO',
          m.dueDateHolds ? 'yes' : 'NO',
          m.reason,
        ]),
      ),
    );
  }
  lines.push('');
  lines.push("A re-judgement supports, and never replaces, the lab's own review of nonconforming work.");
  return lines.join('\n');
}

export function meterImpactText(r: MeterImpact): string {
  if (!r.affected)
    return `${r.assetId}: newest check's as-found verdict is ${verdictWord(r.asFoundVerdict)}; no uses to review`;
  const lines = [
    `${r.assetId}: check ${r.checkId ?? '-'} found it ${verdictWord(r.asFoundVerdict)}; uses since ${r.since ?? 'its first record'}: ${r.uses.length}`,
  ];
  if (r.uses.length)
    lines.push(
      table(
        ['when', 'who', 'frequency', 'what for'],
        r.uses.map((u) => [u.usedAt, u.usedBy, formatFrequency(u.frequencyHz, 5), u.purpose]),
      ),
    );
  return lines.join('\n');
}

export const impactCommands: CommandGroup = {
  usage: `  impact STANDARD --error QTY [--uncertainty QTY] [--since DATE]
                                     a standard found off by QTY ("0.3 ppm", "-40 Hz"): every check made
                                     with it since its newest certificate (or DATE), judged again
  impact METER                       a meter found off: its logged uses since its last passing check
  use REF --at FREQ --log TEXT       logs a use of REF (who and when from the user and the clock)
`,
  options: {
    error: { type: 'string' },
    uncertainty: { type: 'string' },
    since: { type: 'string' },
    log: { type: 'string' },
  },
  commands: {
    async impact(ctx) {
      const ref = ctx.arg('STANDARD or METER');
      const api = ctx.open().api;
      const { error, uncertainty, since } = ctx.values;
      if (error === undefined) {
        const r = await api.meterImpact({ meter: ref });
        ctx.print(r, () => meterImpactText(r));
        return 0;
      }
      const r = await api.standardImpact({
        standard: ref,
        error: String(error),
        ...(uncertainty === undefined ? {} : { uncertainty: String(uncertainty) }),
        ...(since === undefined ? {} : { since: String(since) }),
      });
      ctx.print(r, () => standardImpactText(r));
      return 0;
    },
  },
};
