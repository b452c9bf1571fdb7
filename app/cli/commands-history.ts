// History commands: `trend REF` (drift fits, flags, suggested interval), `use [REF] --at FREQ`
// (fit for use today, with the correction and uncertainty there) and `coverage` (the lab's band
// coverage and gaps). Thin: one LabApi call each, then text or JSON.
import type { CommandGroup } from './command';
import type { CoverageReport, TrendReport, UseAnswer, UseReport } from '../api/contract-history';
import { formatFrequency } from '../engine';
import { UsageError, fmtPpm, signedHz, table } from './format';
import { decimal, formatProbability } from '../model/quantity-format';

const num = (x: number, d = 1) => decimal(x, d);

export function trendText(t: TrendReport): string {
  const lines = [
    `${t.assetId} (${t.state}) as of ${t.asOf}; last check ${t.lastCheckDate ?? '-'}; due ${t.dueDate ?? '-'}`,
    `fits from ${t.segmentFromDate ?? '-'}; time zero (intercepts) at ${t.epochDate ?? '-'}`,
    '',
  ];
  lines.push(
    table(
      [
        'frequency',
        'n',
        'dof',
        'error at t0',
        'u',
        'slope /yr',
        'u',
        'resid. SD',
        'at due (95 %)',
        'P(conf.)',
        'exit',
      ],
      t.frequencies.map((f) => [
        formatFrequency(f.frequencyHz, 5),
        String(f.fit?.points ?? f.history.filter((h) => h.used).length),
        f.fit ? String(f.fit.dof) : '-',
        f.fit ? fmtPpm(f.fit.interceptPpm) : '-',
        f.fit ? num(f.fit.uInterceptPpm) : '-',
        f.fit ? fmtPpm(f.fit.slopePpmPerYear) : '-',
        f.fit ? num(f.fit.uSlopePpmPerYear, 2) : '-',
        f.fit ? num(f.fit.residualSdPpm) : '-',
        f.atDue ? `${fmtPpm(f.atDue.predictedPpm)} +/- ${num(f.atDue.halfWidthPpm)}` : '-',
        f.atDue ? formatProbability(f.atDue.probabilityOfConformity) : '-',
        f.projectedExitDate ?? '-',
      ]),
      [1, 2, 3, 4, 5, 6, 7, 8, 9],
    ),
  );
  lines.push('(errors, uncertainties and slopes in ppm; tolerance per frequency as at the newest check)');
  lines.push('');
  lines.push(
    t.pooled
      ? `pooled drift across the band: ${fmtPpm(t.pooled.driftPpmPerYear)} per year (u = ${num(t.pooled.uDriftPpmPerYear, 2)} ppm per year; ${t.pooled.points} points at ${t.pooled.frequencies} frequencies, dof ${t.pooled.dof}, residual SD ${num(t.pooled.residualSdPpm)} ppm)`
      : 'pooled drift across the band: too few checks',
  );
  lines.push(`projected exit from tolerance: ${t.projectedExitDate ?? 'none within 30 years'}`);
  if (t.health.dip.length) {
    const last = t.health.dip[t.health.dip.length - 1];
    lines.push(
      `dip depth: newest ${last ? num(last.minDb) : '-'} dB (minimum ${t.health.minDipDb} dB)` +
        (t.health.dipSlopeDbPerYear !== null
          ? `, trend ${num(t.health.dipSlopeDbPerYear, 3)} dB per year`
          : ''),
    );
  }
  for (const s of t.steps.filter((x) => x.isStep))
    lines.push(
      `step: ${s.date}, ${s.flaggedFrequencies} of ${s.testedFrequencies} frequencies outside the 99.73 % prediction`,
    );
  lines.push('');
  if (t.flags.length === 0) lines.push('flags: none');
  for (const f of t.flags) lines.push(`${f.severity.toUpperCase().padEnd(7)} ${f.message}`);
  lines.push('');
  lines.push(
    `suggested interval: ${t.suggestion.months} months (${t.suggestion.change}; now ${t.suggestion.currentMonths})`,
  );
  lines.push(t.suggestion.rationale);
  lines.push(
    t.printSuggestedInterval
      ? 'The lab prints suggested intervals on certificates.'
      : 'Shown to the coordinator only: the lab does not print suggested intervals on certificates (ISO/IEC 17025:2017 7.8.4.3).',
  );
  return lines.join('\n');
}

function answerText(a: UseAnswer): string {
  const lines = [
    `${a.assetId} at ${formatFrequency(a.frequencyHz, 7)}: ${a.fit ? 'FIT FOR USE today' : 'NOT FIT FOR USE'}  (${a.description})`,
  ];
  for (const r of a.reasons) lines.push(`  not fit: ${r.message}`);
  if (a.correction && a.uncertainty) {
    lines.push(
      `  correction ${signedHz(a.correction.correctionHz)} (${fmtPpm(a.correction.correctionPpm)}, u = ${num(a.correction.uPpm)} ppm), ${a.correction.basis}, from the check of ${a.correction.fromCheckDate}`,
    );
    lines.push(
      `  expanded uncertainty of a corrected reading: ${formatFrequency(a.uncertainty.expandedHz, 3)} (${num(a.uncertainty.expandedPpm)} ppm, k = ${decimal(a.uncertainty.coverageFactor, 2)})`,
    );
  }
  lines.push(
    `  due ${a.dueDate ?? '-'}${a.daysToDue === null ? '' : a.daysToDue < 0 ? ` (OVERDUE ${-a.daysToDue} d)` : ` (in ${a.daysToDue} d)`}`,
  );
  for (const w of a.warnings) lines.push(`  warning: ${w}`);
  return lines.join('\n');
}

export function useText(r: UseReport): string {
  return [...r.answers.map(answerText), '', ...r.notes].join('\n');
}

export function coverageText(c: CoverageReport): string {
  const rows = c.segments.map((s) => [
    formatFrequency(s.fromHz, 4),
    formatFrequency(s.toHz, 4),
    s.gap ? 'GAP' : 'ok',
    s.note,
  ]);
  const head = `band coverage from ${formatFrequency(c.fromHz, 3)} to ${formatFrequency(c.toHz, 3)} as of ${c.asOf} (usable: in service and not overdue)`;
  const gaps = c.gaps.length
    ? `${c.gaps.length} gap(s): ${c.gaps.map((g) => `${formatFrequency(g.fromHz, 4)} - ${formatFrequency(g.toHz, 4)}`).join(', ')}`
    : 'no gaps';
  return [head, '', table(['from', 'to', '', 'meters'], rows), '', gaps].join('\n');
}

export const historyCommands: CommandGroup = {
  usage: `  trend REF [--json]                 drift per check frequency, flags, suggested interval
  use [REF] --at FREQ                fit for use today at FREQ (exit 1 if not); without REF, every meter covering FREQ
  coverage                           the lab's band coverage from 1 GHz to 110 GHz and its gaps
`,
  options: { at: { type: 'string' } },
  commands: {
    async trend(ctx) {
      const t = await ctx.open().api.getTrend(ctx.arg('REF'));
      ctx.print(t, () => trendText(t));
      return 0;
    },
    async use(ctx) {
      const at = ctx.values.at;
      if (typeof at !== 'string')
        throw new UsageError('use needs --at FREQ (a frequency with its unit, such as 9.3GHz)');
      const ref = ctx.rest[0];
      const r = await ctx
        .open()
        .api.fitForUse(ref === undefined ? { frequency: at } : { assetId: ref, frequency: at });
      ctx.print(r, () => useText(r));
      return r.answers.some((a) => a.fit) ? 0 : 1;
    },
    async coverage(ctx) {
      const c = await ctx.open().api.coverage();
      ctx.print(c, () => coverageText(c));
      return 0;
    },
  },
};
