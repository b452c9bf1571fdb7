// Text output of the CLI: tables with aligned numbers, verdict words, budgets; and the small
// argument helpers every command shares.
import { readTextFile } from './read-text';
import { LabError } from '../api/errors';
import type { CheckRecord, RegisterRow } from '../api/contract';
import { formatFrequency } from '../engine';
import type { PointResult, Verdict } from '../engine/model';

export class UsageError extends Error {}

export const VERDICT_WORDS: Record<Verdict, string> = {
  pass: 'PASS',
  'conditional-pass': 'PASS (conditional)',
  'conditional-fail': 'FAIL (conditional)',
  fail: 'FAIL',
};

export function table(header: string[], rows: string[][], rightAligned: number[] = []): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
  const line = (cells: string[]) =>
    cells
      .map((c, i) => (rightAligned.includes(i) ? c.padStart(widths[i] ?? 0) : c.padEnd(widths[i] ?? 0)))
      .join('  ')
      .trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

export const band = (r: { minHz: number; maxHz: number }) =>
  `${formatFrequency(r.minHz, 4)} - ${formatFrequency(r.maxHz, 4)}`;
export const verdictWord = (v: Verdict | null) => (v ? VERDICT_WORDS[v] : '-');
export const dueWords = (r: RegisterRow) =>
  r.daysToDue === null ? 'never checked' : r.daysToDue < 0 ? `OVERDUE ${-r.daysToDue} d` : `${r.daysToDue} d`;

export function registerTable(rows: RegisterRow[]): string {
  // The flags column appears only where rows carry history flags (the due list).
  const withFlags = rows.some((r) => r.flags !== undefined);
  return table(
    [
      'meter',
      'description',
      'band',
      'state',
      'last check',
      'verdict',
      'due',
      'in',
      ...(withFlags ? ['flags'] : []),
    ],
    rows.map((r) => [
      r.assetId,
      r.description,
      band(r),
      r.state,
      r.lastCheckDate ?? '-',
      verdictWord(r.lastVerdict),
      r.dueDate ?? '-',
      dueWords(r),
      ...(withFlags ? [r.flags?.length ? r.flags.join('; ') : '-'] : []),
    ]),
    [7],
  );
}

export function budgetText(p: PointResult, referenceHz: number): string {
  const b = p.budget;
  const rows = b.contributions.map((c) => [
    c.label,
    c.type,
    c.distribution,
    `${fmt(c.standardUncertainty)} ${c.unit}`,
    sensitivityText(c.sensitivity, c.unit),
    fmt(c.contributionHz),
    Number.isFinite(c.dof) ? String(Math.round(c.dof * 10) / 10) : 'inf',
  ]);
  const lines = [
    table(['input quantity', 'type', 'distribution', 'u(x)', 'c', 'u(y) / Hz', 'dof'], rows, [3, 4, 5, 6]),
    '',
    `reference frequency  ${formatFrequency(referenceHz, 10)}`,
    `indication           ${formatFrequency(p.indicatedHz, 10)}`,
    `corrected to ref.    ${formatFrequency(p.correctedHz, 10)}  (thermal ${fmtPpm(p.thermalCorrectionPpm)}, air ${fmtPpm(p.airCorrectionPpm)})`,
    `error                ${signedHz(p.errorHz)}  (${fmtPpm(p.errorPpm)})`,
    `combined u_c         ${formatFrequency(b.combinedHz, 4)}   effective dof ${Number.isFinite(b.effectiveDof) ? b.effectiveDof.toFixed(1) : 'inf'}`,
    `expanded U           ${formatFrequency(b.expandedHz, 4)}  (k = ${b.coverageFactor.toFixed(2)}, p = ${(b.coverageProbability * 100).toFixed(2)} %; ${p.expandedPpm.toFixed(1)} ppm)`,
    `tolerance            +/- ${formatFrequency(p.decision.toleranceHz, 4)}   acceptance limit ${formatFrequency(p.decision.acceptanceLimitHz, 4)}`,
    `TUR                  ${p.decision.tur.toFixed(2)}`,
    `P(conformity)        ${(p.decision.probabilityOfConformity * 100).toFixed(2)} %  (JCGM 106)`,
    `decision rule        ${ruleWords(p.decision.rule)}`,
    `verdict              ${VERDICT_WORDS[p.decision.verdict]}`,
  ];
  for (const n of p.notes) lines.push(`note: ${n}`);
  return lines.join('\n');
}

export function ruleWords(rule: PointResult['decision']['rule']): string {
  switch (rule.kind) {
    case 'simple':
      return 'simple acceptance (ILAC-G8:09/2019 4.2.1)';
    case 'guarded':
      return `binary with guard band w = ${rule.multipleOfU} U (ILAC-G8:09/2019 4.2.2)`;
    case 'guarded-fixed':
      return `binary with guard band w = ${rule.guardBandPpm} ppm (ILAC-G8:09/2019 4.2.2)`;
    case 'non-binary':
      return 'non-binary with guard band w = U (ILAC-G8:09/2019 4.2.3)';
  }
}

export function fmt(x: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e4 || a < 1e-2 ? x.toExponential(3) : x.toPrecision(4);
}
export const signedHz = (x: number) => `${x < 0 ? '-' : '+'}${formatFrequency(Math.abs(x), 5)}`;

/** Sensitivity with its unit: Hz of error per unit of the input quantity. */
export function sensitivityText(c: number, unit: string): string {
  if (unit === 'Hz') return fmt(c);
  if (unit === '1/K') return `${fmt(c)} Hz K`;
  return `${fmt(c)} Hz/${unit}`;
}

export const fmtPpm = (x: number) => `${x >= 0 ? '+' : ''}${x.toFixed(1)} ppm`;

export function checkText(c: CheckRecord): string {
  const head = [
    `check ${c.checkId} revision ${c.revision} (${c.state}) of ${c.meterAssetId} on ${c.date} by ${c.performer}`,
    `standards ${c.standards.join(', ')}; ${c.conditions.temperatureC} degC, ${c.conditions.pressureHpa} hPa, ${c.conditions.humidityPct} %RH`,
    `as found ${verdictWord(c.asFoundVerdict)}; as left ${verdictWord(c.asLeftVerdict)}${c.adjusted ? ' (adjusted)' : ''}`,
    '',
  ];
  const rows = c.points.map((p) => [
    String(p.seq),
    p.phase,
    formatFrequency(p.referenceHz, 7),
    fmtPpm(p.result.errorPpm),
    `${p.result.expandedPpm.toFixed(1)} ppm`,
    p.result.budget.coverageFactor.toFixed(2),
    `${((Math.abs(p.result.errorHz) / p.result.decision.toleranceHz) * 100).toFixed(0)} %`,
    VERDICT_WORDS[p.result.decision.verdict],
  ]);
  return (
    head.join('\n') +
    table(['#', 'phase', 'reference', 'error', 'U', 'k', 'of tol.', 'verdict'], rows, [0, 3, 4, 5, 6])
  );
}

export function readJsonFile(file: string, cwd: string): unknown {
  const text = readTextFile(file, cwd);
  try {
    return JSON.parse(text) as unknown;
  } catch (e) {
    throw LabError.field(
      'FILE',
      file,
      'a JSON document',
      `${file} is not valid JSON: ${e instanceof Error ? e.message : String(e)}`,
    );
  }
}

export function numberOption(name: string, value: string | undefined, required: boolean): number | undefined {
  if (value === undefined) {
    if (required) throw new UsageError(`--${name} is required`);
    return undefined;
  }
  const n = Number(value.trim());
  if (value.trim() === '' || !Number.isFinite(n)) {
    throw LabError.field(
      `--${name}`,
      value,
      'a number',
      `--${name}: ${JSON.stringify(value)} is not a number`,
    );
  }
  return n;
}
