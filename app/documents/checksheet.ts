// The check-sheet: the full signed record of one check as the lab keeps it on paper. Every
// reading with its direction, the corrections applied, each point's uncertainty budget
// (JCGM 100:2008 layout), error, U, k, decision and verdict, and the signatures with their
// meanings. It carries the same machine-readable record as the certificate.
import type { CheckPointRecord } from '../model/records';
import {
  formatInUnit,
  formatPpm,
  formatProbability,
  formatSensitivity,
  significant,
  withPrefixedHz,
} from '../model/quantity-format';
import { closeIssued, identification, openIssued, type RenderedDocument } from './certificate';
import type { CheckDocumentData } from './model';
import { MUTED, PAGE } from './pdf';
import {
  MEANING_TEXT,
  accuracyText,
  band,
  dialText,
  fingerprintText,
  fixed,
  ghz,
  ghzDecimalsFor,
  hz,
  khzSigned,
  methodText,
  num,
  perKelvin,
  ruleText,
  signed,
  tolerancePpmOfReading,
  verdictText,
  when,
} from './words';

export const CHECK_SHEET_TITLE = 'Check-sheet';

function dof(x: number): string {
  return Number.isFinite(x) ? fixed(x, x < 100 ? 1 : 0) : '∞';
}

/** The reported expanded uncertainty: two significant digits (GUM 7.2.6). */
const expanded = (x: number) => hz(x, 2);

function pointBlock(
  page: CheckSheetPage,
  p: CheckPointRecord,
  data: CheckDocumentData,
  tableDecimals: number,
): void {
  const r = p.result;
  const decimals = Math.max(tableDecimals, ghzDecimalsFor(data.meter, [r.budget.expandedHz]));
  const direct = data.meter.dialKind === 'direct';
  page.ensure(200);
  page.heading(
    `Point ${p.seq}: ${ghz(p.referenceHz, decimals)} GHz, ${p.phase}, standard ${p.standardAssetId}`,
    `verdict ${verdictText(r.decision.verdict)}`,
  );
  const readings = p.readings
    .map((x) => `${x.direction === 'up' ? '↑' : '↓'} ${direct ? ghz(x.value, decimals) : fixed(x.value, 3)}`)
    .join('   ');
  page.fields(
    [
      [`Readings (${direct ? 'GHz' : 'div'}; ↑ up, ↓ down)`, readings],
      [
        'Direction means / GHz',
        `up ${r.upMeanHz === null ? '-' : ghz(r.upMeanHz, decimals)}; down ${r.downMeanHz === null ? '-' : ghz(r.downMeanHz, decimals)}; indication ${ghz(r.indicatedHz, decimals)}${direct ? '' : ` (dial mean ${fixed(r.meanDial, 3)} div)`}`,
      ],
      [
        'Corrections to reference',
        `thermal ${signed(r.thermalCorrectionPpm, 2)} ppm; air ${signed(r.airCorrectionPpm, 2)} ppm; corrected ${ghz(r.correctedHz, decimals)} GHz`,
      ],
      [
        'Error',
        `${khzSigned(r.errorHz, 1)} kHz (${signed(r.errorPpm, 2)} ppm)${p.dipDepthDb === null ? '' : `; dip depth ${fixed(p.dipDepthDb, 1)} dB`}`,
      ],
    ],
    170,
  );
  page.table(
    [
      { title: 'Input quantity', width: 26 },
      { title: 'Type', width: 5 },
      { title: 'Distribution', width: 10 },
      { title: 'u(x)', width: 13, align: 'right' },
      { title: 'Sensitivity c', width: 14, align: 'right' },
      { title: 'u(y)', width: 10, align: 'right' },
      { title: 'ν', width: 6, align: 'right' },
    ],
    r.budget.contributions.map((c) => [
      withPrefixedHz(c.label),
      c.type,
      c.distribution,
      formatInUnit(c.standardUncertainty, c.unit),
      formatSensitivity(c.sensitivity, c.unit),
      hz(c.contributionHz),
      dof(c.dof),
    ]),
    { size: 7.5 },
  );
  const dcs = r.decision;
  page.fields(
    [
      [
        'Combined and expanded',
        `u_c = ${hz(r.budget.combinedHz)}, ν_eff = ${dof(r.budget.effectiveDof)}, k = ${fixed(r.budget.coverageFactor, 2)} (p = ${fixed(r.budget.coverageProbability * 100, 2)} %), U = ${expanded(r.budget.expandedHz)} = ${significant(r.expandedPpm, 2)} ppm`,
      ],
      [
        'Decision',
        `tolerance ±${hz(dcs.toleranceHz, 4)} (${formatPpm(tolerancePpmOfReading(dcs.toleranceHz, r.correctedHz), 0)} of reading), guard band ${hz(dcs.guardBandHz)}, acceptance limit ±${hz(dcs.acceptanceLimitHz, 4)}; TUR ${fixed(dcs.tur, 2)}; probability of conformity ${formatProbability(dcs.probabilityOfConformity)} (JCGM 106:2012); verdict ${verdictText(dcs.verdict)}`,
      ],
      ...r.notes.map((n): [string, string] => ['Note', withPrefixedHz(n)]),
    ],
    170,
  );
}

type CheckSheetPage = ReturnType<typeof openIssued>['page'];

export function renderCheckSheet(data: CheckDocumentData): RenderedDocument {
  const { lab, meter, check, issue } = data;
  const opened = openIssued(
    data,
    CHECK_SHEET_TITLE,
    `Check ${check.checkId} of ${meter.assetId} on ${check.date}`,
  );
  const page = opened.page;
  const d = page.doc;
  const decimals = ghzDecimalsFor(
    meter,
    check.points.map((p) => p.result.budget.expandedHz),
  );
  const rule = check.points[0]?.result.decision.rule ?? lab.decisionRule;

  page.font('bold', 18);
  d.text(CHECK_SHEET_TITLE, PAGE.margin, page.y, { lineBreak: false });
  page.y += 24;
  page.font('regular', 10);
  d.fillColor(MUTED).text(
    `${identification(data)} · check ${check.checkId} revision ${check.revision} (${check.state}) · issued ${issue.issuedAt.slice(0, 10)}`,
    PAGE.margin,
    page.y,
    { lineBreak: false },
  );
  d.fillColor('#111111');
  page.y += 18;
  if (issue.replaces) {
    page.cautions('This check-sheet replaces an earlier one (ISO/IEC 17025:2017 7.8.8)', [
      `It replaces check-sheet ${issue.replaces.number} revision ${issue.replaces.revision}, issued ${when(issue.replaces.issuedAt)}.`,
      `Reason for the change: ${issue.replaces.reason}`,
    ]);
  }

  page.heading('Meter and check');
  page.fields([
    ['Meter', `${meter.assetId}: ${meter.description}`],
    ['Band and dial', `${band(meter)}; ${dialText(meter)}`],
    ['Stated accuracy', accuracyText(meter)],
    [
      'Cavity and reference',
      `α = ${perKelvin(meter.alphaPerK)} (u ${perKelvin(meter.alphaUncertaintyPerK, 2)}); loaded Q ${num(meter.loadedQ, 4)}; reference ${num(meter.reference.temperatureC, 4)} °C, ${num(meter.reference.pressureHpa, 6)} hPa, ${num(meter.reference.humidityPct, 3)} %RH`,
    ],
    ['Date and performer', `${check.date}, ${check.performer}`],
    ['Method', methodText(check.method)],
    [
      'Bench conditions',
      `${fixed(check.conditions.temperatureC, 1)} °C (u ${num(check.conditions.temperatureUncertaintyC, 2)}), ${fixed(check.conditions.pressureHpa, 1)} hPa (u ${num(check.conditions.pressureUncertaintyHpa, 2)}), ${fixed(check.conditions.humidityPct, 0)} %RH (u ${num(check.conditions.humidityUncertaintyPct, 2)})`,
    ],
    [
      'Standards',
      data.standards
        .map(
          (s) =>
            `${s.assetId} (${s.certificate ? `certificate ${s.certificate.certificateId}, ${s.certificate.issuedBy}, valid ${s.certificate.calibratedOn} to ${s.certificate.dueOn}, U = ${num(s.certificate.expandedUncertaintyPpm, 3)} ppm, k = ${num(s.certificate.coverageFactor, 3)}` : 'no certificate valid on the check date'})`,
        )
        .join('; '),
    ],
    ['Decision rule', ruleText(rule)],
    ['Adjusted', check.adjusted ? 'yes: as-found and as-left points below' : 'no'],
    ['Remarks', check.remarks || 'none'],
    ['Record', `engine ${check.engineVersion}; recorded ${when(check.recordedAt)}`],
  ]);

  page.heading('Summary per point');
  page.table(
    [
      { title: '#', width: 3, align: 'right' },
      { title: 'Phase', width: 8 },
      { title: 'Reference / GHz', width: 12, align: 'right' },
      { title: 'Thermal / ppm', width: 8, align: 'right' },
      { title: 'Air / ppm', width: 8, align: 'right' },
      { title: 'Error / ppm', width: 8, align: 'right' },
      { title: 'u_c', width: 9, align: 'right' },
      { title: 'k', width: 5, align: 'right' },
      { title: 'U / ppm', width: 7, align: 'right' },
      { title: 'Tol. / ±ppm', width: 8, align: 'right' },
      { title: 'P(conf.)', width: 8, align: 'right' },
      { title: 'Verdict', width: 12 },
    ],
    check.points.map((p) => [
      String(p.seq),
      p.phase,
      ghz(p.referenceHz, decimals),
      signed(p.result.thermalCorrectionPpm, 2),
      signed(p.result.airCorrectionPpm, 2),
      signed(p.result.errorPpm, 1),
      hz(p.result.budget.combinedHz),
      fixed(p.result.budget.coverageFactor, 2),
      significant(p.result.expandedPpm, 2),
      fixed(tolerancePpmOfReading(p.result.decision.toleranceHz, p.result.correctedHz), 0),
      formatProbability(p.result.decision.probabilityOfConformity),
      verdictText(p.result.decision.verdict),
    ]),
  );
  page.paragraph(
    `As found ${verdictText(check.asFoundVerdict)}; as left ${verdictText(check.asLeftVerdict)}.`,
    { font: 'bold' },
  );

  for (const p of check.points) pointBlock(page, p, data, decimals);

  page.heading('Signatures');
  if (data.signatures.length === 0)
    page.paragraph('No signatures: this revision is a draft.', { font: 'bold' });
  else
    page.table(
      [
        { title: 'Name', width: 16 },
        { title: 'Role', width: 10 },
        { title: 'Meaning', width: 16 },
        { title: 'Signed (UTC)', width: 13 },
        { title: 'Key fingerprint (SHA-256)', width: 24 },
        { title: 'Signed bytes (SHA-256)', width: 24 },
      ],
      data.signatures.map((s) => [
        s.signer,
        s.role,
        MEANING_TEXT[s.meaning],
        when(s.signedAt),
        fingerprintText(s.keyFingerprint),
        fingerprintText(s.payloadSha256),
      ]),
    );
  page.paragraph(
    `The record of this check (${opened.recordName}) is attached to this file; "dipledger verify" checks it and the signatures.`,
    { size: 8, color: MUTED },
  );
  page.end(`End of check-sheet ${issue.number} revision ${issue.revision}`);
  return closeIssued(page, opened, data);
}
