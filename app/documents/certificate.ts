// The certificate of calibration of one meter: what leaves the lab. Its content follows
// ISO/IEC 17025:2017 7.8.2.1 (a to p where they apply), 7.8.4.1 (uncertainty, conditions,
// traceability, as found and as left, conformity), 7.8.6 (the decision rule), 7.8.4.3 (no
// interval unless the lab has agreed to print one) and 7.8.8 (a replacement names what it
// replaces). The clause beside each heading is for the assessor; tests look for each element.
import { formatFrequency } from '../engine';
import type { CheckPointRecord } from '../model/records';
import { drawErrorChart, tolerancePpm } from './chart';
import type { CheckDocumentData } from './model';
import { dccAttachment } from './dcc';
import { CONTENT_WIDTH, MUTED, PAGE, Page, type Attachment } from './pdf';
import type { DocumentSigner } from '../signing/document-key';
import { addSignaturePlaceholder, signPdf } from './pades';
import { buildRecord, encodeRecord, recordFileName, RECORD_MEDIA_TYPE, sha256Hex } from './record';
import {
  MEANING_TEXT,
  accuracyText,
  band,
  dialText,
  fixed,
  ghz,
  ghzDecimalsFor,
  khzSigned,
  methodText,
  num,
  ruleRiskText,
  ruleText,
  fingerprintText,
  signed,
  tolerancePpmOfReading,
  verdictText,
  when,
} from './words';
import { significant } from '../model/quantity-format';

export interface RenderedDocument {
  pdf: Buffer;
  sha256: string;
  record: Buffer;
  recordSha256: string;
  recordName: string;
}

export const CERTIFICATE_TITLE = 'Certificate of Calibration';

/** Information-dictionary keys that tie the file to its record (read back by verify). */
export const INFO_KEYS = {
  number: 'DipledgerNumber',
  revision: 'DipledgerRevision',
  kind: 'DipledgerKind',
  recordName: 'DipledgerRecordName',
  recordSha256: 'DipledgerRecordSha256',
} as const;

export function identification(data: CheckDocumentData): string {
  const word = data.issue.kind === 'certificate' ? 'Certificate' : 'Check-sheet';
  return `${word} ${data.issue.number} revision ${data.issue.revision}`;
}

/** Opens a page set with the identity, info keys and record digest of an issued document. */
export function openIssued(
  data: CheckDocumentData,
  title: string,
  subject: string,
): { page: Page; record: Buffer; recordName: string; recordSha256: string } {
  const record = encodeRecord(buildRecord(data, data.meter.dialKind));
  const recordSha256 = sha256Hex(record);
  const recordName = recordFileName(data);
  const page = new Page({
    title,
    identification: identification(data),
    labName: data.lab.name,
    author: data.lab.name,
    subject,
    keywords: `${data.issue.number} revision ${data.issue.revision}; ${data.meter.assetId}; check ${data.check.checkId} revision ${data.check.revision}`,
    createdAt: data.issue.issuedAt,
    info: {
      [INFO_KEYS.number]: data.issue.number,
      [INFO_KEYS.revision]: String(data.issue.revision),
      [INFO_KEYS.kind]: data.issue.kind,
      [INFO_KEYS.recordName]: recordName,
      [INFO_KEYS.recordSha256]: recordSha256,
    },
  });
  return { page, record, recordName, recordSha256 };
}

/** Attaches the record, writes the furniture and the PDF signature's placeholder (fill it with
 * signRendered). */
export function closeIssued(
  page: Page,
  opened: { record: Buffer; recordName: string; recordSha256: string },
  data: CheckDocumentData,
  more: Attachment[] = [],
): RenderedDocument {
  const pdf = page.finish(
    [
      {
        name: opened.recordName,
        bytes: opened.record,
        mimeType: RECORD_MEDIA_TYPE,
        description: `Machine-readable record of check ${data.check.checkId} revision ${data.check.revision} (dipledger.check/1 with results and signatures)`,
        // PDF/A-3: the data the document's content was rendered from.
        relationship: 'Source',
      },
      ...more,
    ],
    (doc) => addSignaturePlaceholder(doc, data),
  );
  return {
    pdf,
    sha256: sha256Hex(pdf),
    record: opened.record,
    recordSha256: opened.recordSha256,
    recordName: opened.recordName,
  };
}

function amendmentNotice(page: Page, data: CheckDocumentData, noun: string): void {
  const r = data.issue.replaces;
  if (!r) return;
  page.cautions(`This ${noun} replaces an earlier one (ISO/IEC 17025:2017 7.8.8)`, [
    `It replaces ${noun} ${r.number} revision ${r.revision}, issued ${when(r.issuedAt)}, which is withdrawn.`,
    `Reason for the change: ${r.reason}`,
  ]);
}

function resultsTable(page: Page, points: CheckPointRecord[], decimals: number): void {
  page.table(
    [
      { title: '#', width: 3, align: 'right' },
      { title: 'Reference frequency / GHz', width: 13, align: 'right' },
      { title: 'Meter indication / GHz', width: 13, align: 'right' },
      { title: 'Corrected to reference conditions / GHz', width: 15, align: 'right' },
      { title: 'Error / kHz', width: 9, align: 'right' },
      { title: 'Error / ppm', width: 8, align: 'right' },
      { title: 'U / ppm', width: 7, align: 'right' },
      { title: 'k', width: 5, align: 'right' },
      { title: 'Tolerance / ±ppm', width: 9, align: 'right' },
      { title: 'Verdict', width: 12 },
    ],
    points.map((p) => [
      String(p.seq),
      ghz(p.referenceHz, decimals),
      ghz(p.result.indicatedHz, decimals),
      ghz(p.result.correctedHz, decimals),
      khzSigned(p.result.errorHz, 1),
      signed(p.result.errorPpm, 1),
      significant(p.result.expandedPpm, 2),
      fixed(p.result.budget.coverageFactor, 2),
      fixed(tolerancePpmOfReading(p.result.decision.toleranceHz, p.result.correctedHz), 0),
      verdictText(p.result.decision.verdict),
    ]),
    { keepWithHeader: 40 },
  );
}

/** Fills the signature placeholder of a rendered document (asynchronous: the signing library is). */
export async function signRendered(r: RenderedDocument, signer: DocumentSigner): Promise<RenderedDocument> {
  const pdf = await signPdf(r.pdf, signer);
  return { ...r, pdf, sha256: sha256Hex(pdf) };
}

export function renderCertificate(data: CheckDocumentData): RenderedDocument {
  const { lab, meter, check, issue } = data;
  const opened = openIssued(data, CERTIFICATE_TITLE, `Calibration of ${meter.assetId} on ${check.date}`);
  const page = opened.page;
  const d = page.doc;
  const found = check.points.filter((p) => p.phase === 'as-found');
  const left = check.points.filter((p) => p.phase === 'as-left');
  const rule = check.points[0]?.result.decision.rule ?? lab.decisionRule;
  // One decimal place for the frequency columns of both tables: the dial's, or the finer place
  // of the smallest U (GUM 7.2.6), so a correction significant against U shows.
  const decimals = ghzDecimalsFor(
    meter,
    check.points.map((p) => p.result.budget.expandedHz),
  );

  // Title block (7.8.2.1 a, b, d, j).
  page.font('bold', 20);
  d.fillColor('#111111').text(CERTIFICATE_TITLE, PAGE.margin, page.y, { lineBreak: false });
  page.y += 26;
  page.font('regular', 10);
  d.fillColor(MUTED).text(
    `${identification(data)} · issued ${issue.issuedAt.slice(0, 10)}`,
    PAGE.margin,
    page.y,
    {
      lineBreak: false,
    },
  );
  page.y += 18;
  amendmentNotice(page, data, 'certificate');

  page.heading('Laboratory and customer', '7.8.2.1 b, c, e');
  page.fields([
    ['Laboratory', `${lab.name}, ${lab.address || 'address not recorded'}`],
    ['Accreditation', lab.accreditation || 'none stated'],
    ['Location of the work', `at the laboratory's permanent premises (${lab.address || lab.name})`],
    [
      'Customer',
      `${lab.name} (in-house reference equipment of the laboratory), ${lab.address || ''}`.replace(/, $/, ''),
    ],
  ]);

  page.heading('Item calibrated', '7.8.2.1 g');
  page.fields([
    ['Identification', `${meter.assetId}: ${meter.description}`],
    ['Construction', `${meter.construction}, ${meter.port || 'port not recorded'}; band ${band(meter)}`],
    ['Dial', dialText(meter)],
    ['Stated accuracy', accuracyText(meter)],
    [
      'Reference conditions',
      `${num(meter.reference.temperatureC, 4)} °C, ${num(meter.reference.pressureHpa, 6)} hPa, ${num(meter.reference.humidityPct, 3)} %RH (the dial is graduated for these)`,
    ],
    ['Maximum input power', `${num(meter.maxInputPowerW, 3)} W`],
    [
      'Condition on receipt',
      `in the laboratory's custody (${meter.location || 'location not recorded'}); as found ${verdictText(check.asFoundVerdict)}${check.adjusted ? '; adjusted during the calibration' : '; not adjusted'}`,
    ],
  ]);

  page.heading('Dates', '7.8.2.1 h, i, j');
  page.fields([
    ['Date of calibration', check.date],
    ['Date of receipt', 'not applicable: the item is held by the laboratory'],
    ['Date of issue', issue.issuedAt.slice(0, 10)],
  ]);

  page.heading('Method', '7.8.2.1 f, k, n');
  page.paragraph(methodText(check.method));
  page.paragraph(
    'Each indication is the mean of the means of the two directions of approach, corrected to the reference conditions of the dial for thermal expansion of the cavity and for the refractive index of the air (ITU-R P.453). The uncertainty is evaluated per point following JCGM 100:2008 (GUM), with k from the Student t distribution for the Welch-Satterthwaite effective degrees of freedom at a coverage probability of 95.45 %.',
  );
  page.fields([
    ['Sampling', 'not applicable: the whole item is calibrated'],
    ['Additions, deviations, exclusions', check.remarks ? `as remarked: ${check.remarks}` : 'none'],
    [
      'Record',
      `check ${check.checkId} revision ${check.revision}, computed by engine ${check.engineVersion}`,
    ],
  ]);

  page.heading('Conditions of the calibration', '7.8.4.1 b');
  const c = check.conditions;
  page.fields([
    [
      'Air temperature',
      `${fixed(c.temperatureC, 1)} °C (standard uncertainty ${num(c.temperatureUncertaintyC, 2)} °C)`,
    ],
    [
      'Air pressure',
      `${fixed(c.pressureHpa, 1)} hPa (standard uncertainty ${num(c.pressureUncertaintyHpa, 2)} hPa)`,
    ],
    [
      'Relative humidity',
      `${fixed(c.humidityPct, 0)} %RH (standard uncertainty ${num(c.humidityUncertaintyPct, 2)} %RH)`,
    ],
  ]);

  page.heading('Metrological traceability', '7.8.4.1 c; 7.8.2.1 p');
  page.paragraph(
    'The reference frequencies were set on the standards below, whose calibrations were valid on the date of calibration. Through them the results are metrologically traceable to the SI unit of frequency, the hertz, realised from the second. The calibrations of the standards were performed by the external providers named; every measurement on this certificate was made by this laboratory.',
  );
  page.table(
    [
      { title: 'Standard', width: 10 },
      { title: 'Description', width: 30 },
      { title: 'Certificate', width: 14 },
      { title: 'Issued by (external provider)', width: 18 },
      { title: 'Valid', width: 16 },
      { title: 'U (k)', width: 10, align: 'right' },
    ],
    data.standards.map((s) => [
      s.assetId,
      s.description,
      s.certificate?.certificateId ?? 'none valid on the date',
      s.certificate?.issuedBy ?? '-',
      s.certificate ? `${s.certificate.calibratedOn} to ${s.certificate.dueOn}` : '-',
      s.certificate
        ? `${num(s.certificate.expandedUncertaintyPpm, 3)} ppm (k = ${num(s.certificate.coverageFactor, 3)})`
        : '-',
    ]),
  );

  page.heading(
    check.adjusted ? 'Results as found (before adjustment)' : 'Results (as found and as left: not adjusted)',
    '7.8.2.1 m; 7.8.4.1 a, d',
  );
  resultsTable(page, found, decimals);
  if (check.adjusted) {
    page.heading('Results as left (after adjustment)', '7.8.4.1 d');
    resultsTable(page, left, decimals);
  }
  page.paragraph(
    'Error = corrected indication minus reference frequency. U is the expanded uncertainty of the error, in ppm of the reference frequency, for a coverage probability of about 95 % with the coverage factor k shown. The tolerance is the stated accuracy of the meter at that frequency.',
    { size: 8, color: MUTED },
  );

  // The chart needs about 230 pt; keep it whole.
  page.ensure(250);
  page.heading('Error against frequency', '7.8.2.1 m');
  drawErrorChart(page, { x: PAGE.margin, y: page.y, width: CONTENT_WIDTH, height: 230 }, meter, check);
  page.y += 236;

  page.heading('Statement of conformity', '7.8.4.1 e; 7.8.6');
  const judged = check.adjusted ? left : found;
  const verdict = check.adjusted ? check.asLeftVerdict : check.asFoundVerdict;
  const tolRange = judged.map((p) => tolerancePpm(meter, p.referenceHz));
  page.paragraph(
    `Applies to: the ${judged.length} ${check.adjusted ? 'as-left' : ''} points tabulated above, from ${formatFrequency(Math.min(...judged.map((p) => p.referenceHz)), 5)} to ${formatFrequency(Math.max(...judged.map((p) => p.referenceHz)), 5)}.`.replace(
      '  ',
      ' ',
    ),
  );
  page.paragraph(
    `Specification: the stated accuracy of ${meter.assetId}, ${accuracyText(meter)}${tolRange.length && fixed(Math.min(...tolRange), 0) !== fixed(Math.max(...tolRange), 0) ? ` (±${fixed(Math.min(...tolRange), 0)} to ±${fixed(Math.max(...tolRange), 0)} ppm at these points)` : ''}.`,
  );
  page.paragraph(`Decision rule: ${ruleText(rule)} ${ruleRiskText(rule)}`);
  page.paragraph(
    `Statement: ${verdict === 'pass' ? 'the meter CONFORMS to its stated accuracy at every point' : verdict === 'fail' ? 'the meter DOES NOT CONFORM to its stated accuracy' : `the result is ${verdictText(verdict)}: see the verdict of each point`} (${check.adjusted ? 'as left' : 'as found and as left'}: ${verdictText(verdict)}${check.adjusted ? `; as found: ${verdictText(check.asFoundVerdict)}` : ''}).`,
    { font: 'bold' },
  );

  if (lab.printSuggestedInterval && data.suggestedInterval) {
    page.heading('Suggested calibration interval', '7.8.4.3 (printed by agreement)');
    page.paragraph(
      `${data.suggestedInterval.months} months, by ${data.suggestedInterval.method}: ${data.suggestedInterval.reason} Printed because the laboratory has agreed to show suggested intervals; it is a suggestion, not a due date.`,
    );
  }

  page.heading('Authorization', '7.8.2.1 o');
  page.table(
    [
      { title: 'Name', width: 18 },
      { title: 'Role', width: 11 },
      { title: 'Meaning of the signature', width: 18 },
      { title: 'Signed (UTC)', width: 14 },
      { title: 'Key fingerprint (SHA-256)', width: 26 },
    ],
    data.signatures.map((s) => [
      s.signer,
      s.role,
      MEANING_TEXT[s.meaning],
      when(s.signedAt),
      fingerprintText(s.keyFingerprint),
    ]),
  );
  page.paragraph(
    `Signatures are electronic (Ed25519) over the record of check ${check.checkId} revision ${check.revision}; the record is attached to this file as ${opened.recordName} and can be checked with "dipledger verify".`,
    { size: 8, color: MUTED },
  );

  page.heading('Notes', '7.8.2.1 l');
  page.paragraph(
    'The results relate only to the item calibrated, at the time and under the conditions stated.',
  );
  page.paragraph(
    'This certificate shall not be reproduced except in full without the written approval of the laboratory.',
  );
  page.paragraph(
    'The statement of conformity supports, and does not replace, the quality system of the user, local regulations and accredited practice.',
  );
  page.end(`End of certificate ${issue.number} revision ${issue.revision}`);
  // The hybrid certificate: the DCC travels beside the record, as data a receiving lab reads.
  return closeIssued(page, opened, data, [dccAttachment(data)]);
}
