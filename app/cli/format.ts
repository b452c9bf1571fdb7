// Text output of the CLI: tables with aligned numbers, verdict words, budgets; and the small
// argument helpers every command shares.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { LabError } from '../api/errors';
import type { CheckRecord, RegisterRow } from '../api/contract';
import { formatFrequency } from '../engine';
import type { PointResult, Verdict } from '../engine/model';
import {
  decimal,
  formatHz,
  formatInUnit,
  formatPpm,
  formatProbability,
  formatSensitivity,
  significant,
  uncertaintyPlace,
  withPrefixedHz,
} from '../model/quantity-format';

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
    withPrefixedHz(c.label),
    c.type,
    c.distribution,
    formatInUnit(c.standardUncertainty, c.unit),
    formatSensitivity(c.sensitivity, c.unit),
    formatHz(c.contributionHz, { digits: 3 }),
    Number.isFinite(c.dof) ? decimal(c.dof, 1) : 'inf',
  ]);
  // Indication and corrected value to the decimal place of U at two significant digits (GUM
  // 7.2.6), so the correction shows whenever it matters against U.
  const at = (hz: number) => formatHz(hz, { placeExponent: uncertaintyPlace(b.expandedHz) });
  const tolPpm = (p.decision.toleranceHz / Math.abs(p.correctedHz)) * 1e6;
  const lines = [
    table(['input quantity', 'type', 'distribution', 'u(x)', 'c', 'u(y)', 'dof'], rows, [3, 4, 5, 6]),
    '',
    `reference frequency  ${formatHz(referenceHz, { digits: 10, trim: true })}`,
    `indication           ${at(p.indicatedHz)}`,
    `corrected to ref.    ${at(p.correctedHz)}  (thermal ${fmtPpm(p.thermalCorrectionPpm)}, air ${fmtPpm(p.airCorrectionPpm)})`,
    `error                ${signedHz(p.errorHz)}  (${fmtPpm(p.errorPpm)})`,
    `combined u_c         ${formatHz(b.combinedHz, { digits: 3 })}   effective dof ${Number.isFinite(b.effectiveDof) ? decimal(b.effectiveDof, 1) : 'inf'}`,
    `expanded U           ${formatHz(b.expandedHz, { digits: 2 })}  (k = ${decimal(b.coverageFactor, 2)}, p = ${decimal(b.coverageProbability * 100, 2)} %; ${significant(p.expandedPpm, 2)} ppm)`,
    `tolerance            +/- ${formatHz(p.decision.toleranceHz, { digits: 4 })} (${decimal(tolPpm, 0)} ppm of reading)   acceptance limit ${formatHz(p.decision.acceptanceLimitHz, { digits: 4 })}`,
    `TUR                  ${decimal(p.decision.tur, 2)}`,
    `P(conformity)        ${formatProbability(p.decision.probabilityOfConformity)}  (JCGM 106)`,
    `decision rule        ${ruleWords(p.decision.rule)}`,
    `verdict              ${VERDICT_WORDS[p.decision.verdict]}`,
  ];
  for (const n of p.notes) lines.push(`note: ${withPrefixedHz(n)}`);
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

/** A plain number to four significant digits, never in e-notation. */
export function fmt(x: number): string {
  return x === 0 ? '0' : significant(x, 4);
}
export const signedHz = (x: number) => `${x < 0 ? '-' : '+'}${formatHz(Math.abs(x), { digits: 5 })}`;

export const fmtPpm = (x: number) => formatPpm(x, 1, { signed: true });

export function checkText(c: CheckRecord): string {
  const head = [
    `check ${c.checkId} revision ${c.revision} (${c.state}) of ${c.meterAssetId} on ${c.date} by ${c.performer}`,
    `standards ${c.standards.join(', ')}; ${c.conditions.temperatureC} °C, ${c.conditions.pressureHpa} hPa, ${c.conditions.humidityPct} %RH`,
    `as found ${verdictWord(c.asFoundVerdict)}; as left ${verdictWord(c.asLeftVerdict)}${c.adjusted ? ' (adjusted)' : ''}`,
    '',
  ];
  const rows = c.points.map((p) => [
    String(p.seq),
    p.phase,
    formatFrequency(p.referenceHz, 7),
    fmtPpm(p.result.errorPpm),
    `${significant(p.result.expandedPpm, 2)} ppm`,
    decimal(p.result.budget.coverageFactor, 2),
    `${decimal((Math.abs(p.result.errorHz) / p.result.decision.toleranceHz) * 100, 0)} %`,
    VERDICT_WORDS[p.result.decision.verdict],
  ]);
  return (
    head.join('\n') +
    table(['#', 'phase', 'reference', 'error', 'U', 'k', 'of tol.', 'verdict'], rows, [0, 3, 4, 5, 6])
  );
}

export function readJsonFile(file: string, cwd: string): unknown {
  const full = path.resolve(cwd, file);
  let text: string;
  try {
    text = readFileSync(full, 'utf8');
  } catch {
    throw LabError.field('FILE', file, 'a readable file', `cannot read ${file}`);
  }
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
