// The Digital Calibration Certificate (DCC) of an issued certificate: the same content as the
// PDF, as data in the open XML standard published by PTB (DCC schema 3.1.2, with results as
// D-SI 2.1.0 quantities). Elements, attributes and codes carry the standard's names; the words
// inside them are ours. Built with xmlbuilder2 from the plain document data, so the same
// record always gives the same bytes; every number is written in the shortest decimal form
// that reads back to exactly the stored double, so a reader can compare it with the record.
//
// Quantities are marked with refType codes: `basic_*` from the DCC community's shared list
// (from memory: as used in PTB's published examples), `dipledger_*` for the ones that list does
// not name. A number D-SI cannot carry (infinite, not a number) refuses the whole DCC.
import { create } from 'xmlbuilder2';
import type { XMLBuilder } from 'xmlbuilder2/lib/interfaces';
import type { Verdict } from '../engine/model';
import type { CheckDocumentData } from './model';
import type { Attachment } from './pdf';
import {
  MEANING_TEXT,
  accuracyText,
  band,
  dialText,
  methodText,
  num,
  ruleRiskText,
  ruleText,
  verdictText,
} from './words';

export const DCC_NS = 'https://ptb.de/dcc';
export const SI_NS = 'https://ptb.de/si';
export const DCC_SCHEMA_VERSION = '3.1.2';
export const DCC_MEDIA_TYPE = 'application/xml';

/** ISO 3166-1 user-assigned code for "country not stated": the lab settings name no country. */
export const DCC_COUNTRY_UNSTATED = 'ZZ';

/** The DCC's conformity codes (dcc:stringConformityStatementStatusType) for our verdicts. */
export const CONFORMITY_CODE: Record<Verdict, string> = {
  pass: 'pass',
  'conditional-pass': 'conditionalPass',
  'conditional-fail': 'conditionalFail',
  fail: 'fail',
};

/** refType codes the writer puts on what a reader (verify, tests) looks for. */
export const REF = {
  asFound: 'dipledger_asFound',
  asLeft: 'dipledger_asLeft',
  point: 'dipledger_checkPoint',
  reference: 'basic_referenceValue',
  indication: 'dipledger_indication',
  corrected: 'basic_measuredValue',
  error: 'basic_measurementError',
  conformity: 'basic_conformity',
  tolerance: 'dipledger_tolerance',
  acceptanceLimit: 'dipledger_acceptanceLimit',
  probabilityOfConformity: 'dipledger_probabilityOfConformity',
  temperature: 'dipledger_airTemperature',
  pressure: 'dipledger_airPressure',
  humidity: 'dipledger_relativeHumidity',
  referenceConditions: 'dipledger_referenceConditions',
  decisionRule: 'dipledger_decisionRule',
  issueDate: 'dipledger_issueDate',
  certificateNumber: 'dipledger_certificateNumber',
  certificateRevision: 'dipledger_certificateRevision',
  checkRecord: 'dipledger_checkRecord',
} as const;

/** D-SI unit strings. */
export const UNIT = {
  hertz: '\\hertz',
  celsius: '\\degreecelsius',
  hectopascal: '\\hecto\\pascal',
  percent: '\\percent',
  one: '\\one',
} as const;

/** A value the DCC cannot carry: the DCC is refused, with the field and the value. */
export class DccError extends Error {}

export function dccFileName(data: Pick<CheckDocumentData, 'issue'>): string {
  return `${data.issue.number}-r${data.issue.revision}-dcc.xml`;
}

// --- numbers in the forms the D-SI simple types allow -------------------------------------

/** si:decimalType: the shortest text that reads back to the same double (no NaN, no INF). */
function decimal(x: number, field: string): string {
  if (!Number.isFinite(x))
    throw new DccError(`${field}: ${x} cannot be written in a DCC (D-SI takes finite numbers)`);
  return String(x);
}

/** si:uncertaintyValueType: finite and not negative. */
function uncertainty(x: number, field: string): string {
  if (!(x >= 0)) throw new DccError(`${field}: ${x} is not an uncertainty (expected a number of at least 0)`);
  return decimal(x, field);
}

/** si:kValueType: at least 1, plain decimal (no exponent). */
function coverageFactor(k: number, field: string): string {
  const s = decimal(k, field);
  if (!(k >= 1) || /e/i.test(s))
    throw new DccError(`${field}: ${k} is not a coverage factor (expected 1 or more)`);
  return s;
}

/** The shortest round-trip digits of a number between 0 and 1, written without an exponent
 * ("1.5e-7" becomes "0.00000015"): the same digits, so it reads back to the same double. */
function plainDecimal(x: number): string {
  const s = String(x);
  const m = /^(\d)(?:\.(\d+))?e-(\d+)$/.exec(s);
  if (!m) return s;
  return `0.${'0'.repeat(Number(m[3]) - 1)}${m[1]}${m[2] ?? ''}`;
}

/** si:probabilityValueType: 0 to 1, plain decimal (no exponent). */
function probability(p: number, field: string): string {
  if (!(p >= 0 && p <= 1)) throw new DccError(`${field}: ${p} is not a probability (expected 0 to 1)`);
  return plainDecimal(p);
}

/** XML 1.0 cannot carry most control characters (nor lone surrogates): they become U+FFFD. */
function xmlText(s: string): string {
  return s.replace(/[^\t\n\r\u0020-\uD7FF\uE000-\uFFFD\u{10000}-\u{10FFFF}]/gu, '\uFFFD');
}

type CheckPointRecord = CheckDocumentData['check']['points'][number];

// --- small builders ------------------------------------------------------------------------

type Node = XMLBuilder;

function text(parent: Node, name: string, content: string): Node {
  const el = parent.ele(`dcc:${name}`);
  el.ele('dcc:content', { lang: 'en' }).txt(xmlText(content));
  return el;
}

function rich(parent: Node, name: string, paragraphs: string[]): Node {
  const el = parent.ele(`dcc:${name}`);
  for (const p of paragraphs) el.ele('dcc:content', { lang: 'en' }).txt(xmlText(p));
  return el;
}

interface Expanded {
  uncertainty: number;
  k: number;
  p: number;
  distribution: string;
}

function real(parent: Node, value: number, unit: string, field: string, unc?: Expanded): void {
  const r = parent.ele('si:real');
  r.ele('si:value').txt(decimal(value, field));
  r.ele('si:unit').txt(unit);
  if (unc) {
    const e = r.ele('si:expandedUnc');
    e.ele('si:uncertainty').txt(uncertainty(unc.uncertainty, `${field} uncertainty`));
    e.ele('si:coverageFactor').txt(coverageFactor(unc.k, `${field} coverage factor`));
    e.ele('si:coverageProbability').txt(probability(unc.p, `${field} coverage probability`));
    e.ele('si:distribution').txt(unc.distribution);
  }
}

function quantity(
  parent: Node,
  refType: string,
  name: string,
  value: number,
  unit: string,
  field: string,
  unc?: Expanded,
): Node {
  const q = parent.ele('dcc:quantity', { refType });
  text(q, 'name', name);
  real(q, value, unit, field, unc);
  return q;
}

function identification(parent: Node, issuer: string, value: string, name: string, refType?: string): void {
  const id = parent.ele('dcc:identification', refType ? { refType } : {});
  id.ele('dcc:issuer').txt(issuer);
  id.ele('dcc:value').txt(xmlText(value));
  text(id, 'name', name);
}

/** contactType: name, e-mail (the lab settings hold none; the element is required), location. */
function contact(parent: Node, name: string, address: string): void {
  text(parent, 'name', name);
  parent.ele('dcc:eMail').txt('');
  rich(parent.ele('dcc:location'), 'further', [address || 'address not recorded']);
}

/** A standard uncertainty (k = 1) as si:expandedUnc: coverage probability for a normal distribution. */
function standardUnc(u: number): Expanded {
  return { uncertainty: u, k: 1, p: 0.6827, distribution: 'normal' };
}

// --- the certificate ---------------------------------------------------------------------

const PHASE_WORDS = { 'as-found': 'as found', 'as-left': 'as left' } as const;

function administrativeData(root: Node, data: CheckDocumentData): void {
  const { lab, meter, check, issue } = data;
  const admin = root.ele('dcc:administrativeData');

  const sw = admin.ele('dcc:dccSoftware').ele('dcc:software');
  text(sw, 'name', 'Dipledger');
  sw.ele('dcc:release').txt(`engine ${check.engineVersion}`);
  sw.ele('dcc:type').txt('application');
  rich(sw, 'description', [
    'Calibration records for passive cavity frequency meters; the release is the engine version that computed the results.',
  ]);

  const core = admin.ele('dcc:coreData');
  core.ele('dcc:countryCodeISO3166_1').txt(DCC_COUNTRY_UNSTATED);
  core.ele('dcc:usedLangCodeISO639_1').txt('en');
  core.ele('dcc:mandatoryLangCodeISO639_1').txt('en');
  core.ele('dcc:uniqueIdentifier').txt(`${issue.number}-r${issue.revision}`);
  const ids = core.ele('dcc:identifications');
  identification(ids, 'calibrationLaboratory', issue.number, 'Certificate number', REF.certificateNumber);
  identification(
    ids,
    'calibrationLaboratory',
    String(issue.revision),
    'Certificate revision',
    REF.certificateRevision,
  );
  identification(
    ids,
    'calibrationLaboratory',
    `${check.checkId} revision ${check.revision}`,
    'Signed check record the certificate was issued from',
    REF.checkRecord,
  );
  core.ele('dcc:beginPerformanceDate').txt(check.date);
  core.ele('dcc:endPerformanceDate').txt(check.date);
  core.ele('dcc:performanceLocation').txt('laboratory');

  const item = admin.ele('dcc:items').ele('dcc:item');
  text(item, 'name', meter.description || meter.assetId);
  rich(item, 'description', [
    `Passive cavity frequency meter (absorption wavemeter), ${meter.construction}, ${meter.port || 'port not recorded'}; band ${band(meter)}.`,
    `Dial: ${dialText(meter)}. Stated accuracy: ${accuracyText(meter)}.`,
    `Reference conditions of the dial: ${num(meter.reference.temperatureC, 4)} °C, ${num(meter.reference.pressureHpa, 6)} hPa, ${num(meter.reference.humidityPct, 3)} %RH.`,
    `Maximum input power ${num(meter.maxInputPowerW, 3)} W.`,
    `Condition on receipt: in the laboratory's custody (${meter.location || 'location not recorded'}); as found ${verdictText(check.asFoundVerdict)}${check.adjusted ? '; adjusted during the calibration' : '; not adjusted'}.`,
  ]);
  text(item.ele('dcc:manufacturer'), 'name', 'not recorded by the laboratory');
  identification(item.ele('dcc:identifications'), 'owner', meter.assetId, 'Asset id in the laboratory');

  contact(admin.ele('dcc:calibrationLaboratory').ele('dcc:contact'), lab.name, lab.address);

  const persons = admin.ele('dcc:respPersons');
  const main =
    [...data.signatures].reverse().find((s) => s.meaning !== 'performed') ?? data.signatures.at(-1);
  for (const s of data.signatures) {
    const p = persons.ele('dcc:respPerson');
    text(p.ele('dcc:person'), 'name', s.signer);
    rich(p, 'description', [
      `Signed ${s.signedAt} (Ed25519 over the record of check ${check.checkId} revision ${check.revision}); key fingerprint SHA-256 ${s.keyFingerprint}.`,
    ]);
    p.ele('dcc:role').txt(xmlText(`${s.role}: ${MEANING_TEXT[s.meaning]}`));
    p.ele('dcc:mainSigner').txt(String(s === main));
    p.ele('dcc:cryptElectronicSignature').txt('true');
  }
  if (!data.signatures.some((s) => s.meaning === 'performed' && s.signer === check.performer)) {
    const p = persons.ele('dcc:respPerson');
    text(p.ele('dcc:person'), 'name', check.performer);
    p.ele('dcc:role').txt('performed the check');
  }

  // The lab's own equipment: the laboratory is its own customer.
  contact(admin.ele('dcc:customer'), `${lab.name} (in-house reference equipment)`, lab.address);

  statements(admin.ele('dcc:statements'), data);
}

function statements(list: Node, data: CheckDocumentData): void {
  const { lab, meter, check, issue } = data;
  const rule = check.points[0]?.result.decision.rule ?? lab.decisionRule;

  const ruleSt = list.ele('dcc:statement', { refType: REF.decisionRule });
  ruleSt.ele('dcc:norm').txt('ILAC-G8:09/2019');
  rich(ruleSt, 'declaration', [`Decision rule: ${ruleText(rule)}`, ruleRiskText(rule)]);

  const verdicts: { refType: string; words: string; verdict: Verdict | null }[] = check.adjusted
    ? [
        { refType: REF.asFound, words: 'as found (before adjustment)', verdict: check.asFoundVerdict },
        { refType: REF.asLeft, words: 'as left (after adjustment)', verdict: check.asLeftVerdict },
      ]
    : [{ refType: REF.asFound, words: 'as found and as left (not adjusted)', verdict: check.asFoundVerdict }];
  for (const v of verdicts) {
    const st = list.ele('dcc:statement', { refType: `${REF.conformity} ${v.refType}` });
    st.ele('dcc:norm').txt('ILAC-G8:09/2019');
    rich(st, 'declaration', [
      `Statement of conformity, ${v.words}: ${verdictText(v.verdict)} against the stated accuracy of ${meter.assetId}, ${accuracyText(meter)}, under the decision rule stated.`,
    ]);
    if (v.verdict) st.ele('dcc:conformity').txt(CONFORMITY_CODE[v.verdict]);
  }

  const trace = list.ele('dcc:statement', { refType: 'dipledger_traceability' });
  trace.ele('dcc:traceable').txt(String(data.standards.every((s) => s.certificate !== null)));
  rich(trace, 'declaration', [
    'The reference frequencies were set on the standards listed under the measuring equipment, each with a calibration valid on the date of calibration; through them the results are metrologically traceable to the SI unit of frequency, the hertz.',
  ]);

  const issued = list.ele('dcc:statement', { refType: REF.issueDate });
  rich(issued, 'declaration', [
    `Date of issue of certificate ${issue.number} revision ${issue.revision}. The certificate is a PDF/A-3 file that carries this DCC and the signed record of check ${check.checkId} revision ${check.revision}.`,
  ]);
  issued.ele('dcc:date').txt(issue.issuedAt.slice(0, 10));

  if (issue.replaces) {
    const r = issue.replaces;
    rich(list.ele('dcc:statement', { refType: 'dipledger_replaces' }), 'declaration', [
      `This certificate replaces certificate ${r.number} revision ${r.revision}, issued ${r.issuedAt.slice(0, 10)}, which is withdrawn (ISO/IEC 17025:2017 7.8.8). Reason: ${r.reason}`,
    ]);
  }

  rich(list.ele('dcc:statement', { refType: 'dipledger_accreditation' }), 'declaration', [
    `Accreditation: ${lab.accreditation || 'none stated'}.`,
  ]);

  if (lab.printSuggestedInterval && data.suggestedInterval) {
    const s = data.suggestedInterval;
    const st = list.ele('dcc:statement', { refType: 'dipledger_suggestedInterval' });
    rich(st, 'declaration', [
      `Suggested calibration interval by ${s.method}: ${s.reason} Stated because the laboratory has agreed to show suggested intervals; it is a suggestion, not a due date.`,
    ]);
    st.ele('dcc:period').txt(`P${s.months}M`);
  }

  rich(list.ele('dcc:statement', { refType: 'dipledger_scope' }), 'declaration', [
    'The results relate only to the item calibrated, at the time and under the conditions stated.',
    'This certificate shall not be reproduced except in full without the written approval of the laboratory.',
    'The statement of conformity supports, and does not replace, the quality system of the user, local regulations and accredited practice.',
  ]);
}

function usedMethods(parent: Node, method: 'tune-to-dip' | 'sweep'): void {
  const list = parent.ele('dcc:usedMethods');
  const m = (name: string, description: string, norms: string[] = [], refs: string[] = []) => {
    const el = list.ele('dcc:usedMethod');
    text(el, 'name', name);
    rich(el, 'description', [description]);
    for (const n of norms) el.ele('dcc:norm').txt(n);
    for (const r of refs) el.ele('dcc:reference').txt(r);
  };
  m(method === 'tune-to-dip' ? 'Tune-to-dip' : 'Sweep', methodText(method));
  if (method === 'sweep')
    m(
      'Resonance from the swept dip',
      'The resonance frequency is fitted to the absorption dip (Lorentzian on a sloped baseline, weighted non-linear least squares); every fit judges its own residuals.',
      [],
      ['Petersan and Anlage, J. Appl. Phys. 84, 3392 (1998)', 'NPL Report MAT 58 (2021)'],
    );
  m(
    'Correction for the refractive index of air',
    'The indication is corrected to the reference conditions of the dial for the refractive index of the air, from temperature, pressure and humidity.',
    ['ITU-R P.453-14'],
  );
  m(
    'Correction for thermal expansion of the cavity',
    'The indication is corrected for the uniform thermal expansion of the cavity from the bench temperature to the reference temperature (common practice).',
  );
  m(
    'Evaluation of measurement uncertainty',
    'Per point, with k from the Student t distribution for the Welch-Satterthwaite effective degrees of freedom at a coverage probability of 95.45 %.',
    ['JCGM 100:2008'],
  );
  m(
    'Decision rule and probability of conformity',
    'Each point is judged against the stated accuracy under the decision rule stated; the probability of conformity assumes a normal distribution.',
    ['ILAC-G8:09/2019', 'JCGM 106:2012'],
  );
}

function measuringEquipments(parent: Node, data: CheckDocumentData): void {
  if (data.standards.length === 0) return;
  const list = parent.ele('dcc:measuringEquipments');
  for (const s of data.standards) {
    const eq = list.ele('dcc:measuringEquipment', { refType: 'dipledger_frequencyStandard' });
    text(eq, 'name', s.description || s.assetId);
    const c = s.certificate;
    rich(eq, 'description', [
      c
        ? `Calibrated by ${c.issuedBy}, certificate ${c.certificateId}, valid ${c.calibratedOn} to ${c.dueOn}; expanded uncertainty ${num(c.expandedUncertaintyPpm, 3)} ppm (k = ${num(c.coverageFactor, 3)}).`
        : 'No calibration of this standard was valid on the date of calibration (an exception recorded by the laboratory).',
    ]);
    const ids = eq.ele('dcc:identifications');
    identification(ids, 'calibrationLaboratory', s.assetId, 'Asset id in the laboratory');
    if (c) identification(ids, 'other', c.certificateId, `Calibration certificate issued by ${c.issuedBy}`);
  }
}

function influenceConditions(parent: Node, data: CheckDocumentData): void {
  const c = data.check.conditions;
  const list = parent.ele('dcc:influenceConditions');
  const cond = (refType: string, name: string, value: number, unit: string, u: number, field: string) => {
    const el = list.ele('dcc:influenceCondition', { refType });
    text(el, 'name', name);
    rich(el, 'description', [
      'Measured at the bench during the calibration; the uncertainty is a standard uncertainty (k = 1).',
    ]);
    quantity(el.ele('dcc:data'), refType, name, value, unit, field, standardUnc(u));
  };
  cond(
    REF.temperature,
    'Air temperature',
    c.temperatureC,
    UNIT.celsius,
    c.temperatureUncertaintyC,
    'conditions.temperatureC',
  );
  cond(
    REF.pressure,
    'Air pressure',
    c.pressureHpa,
    UNIT.hectopascal,
    c.pressureUncertaintyHpa,
    'conditions.pressureHpa',
  );
  cond(
    REF.humidity,
    'Relative humidity',
    c.humidityPct,
    UNIT.percent,
    c.humidityUncertaintyPct,
    'conditions.humidityPct',
  );
}

function referenceConditions(parent: Node, data: CheckDocumentData): void {
  const r = data.meter.reference;
  const md = parent.ele('dcc:measurementMetaData').ele('dcc:metaData', { refType: REF.referenceConditions });
  rich(md, 'declaration', [
    'Reference conditions of the dial: the corrected indications are what the meter would read under these conditions.',
  ]);
  const d = md.ele('dcc:data');
  quantity(
    d,
    REF.temperature,
    'Reference temperature',
    r.temperatureC,
    UNIT.celsius,
    'reference.temperatureC',
  );
  quantity(
    d,
    REF.pressure,
    'Reference air pressure',
    r.pressureHpa,
    UNIT.hectopascal,
    'reference.pressureHpa',
  );
  quantity(
    d,
    REF.humidity,
    'Reference relative humidity',
    r.humidityPct,
    UNIT.percent,
    'reference.humidityPct',
  );
}

function pointResult(results: Node, p: CheckPointRecord): void {
  const r = p.result;
  const field = (f: string) => `point ${p.seq} ${f}`;
  const res = results.ele('dcc:result', { id: `point-${p.seq}`, refType: REF.point });
  text(res, 'name', `Point ${p.seq}, ${PHASE_WORDS[p.phase]}`);
  rich(res, 'description', [`Reference frequency set on standard ${p.standardAssetId}.`]);
  const list = res.ele('dcc:data').ele('dcc:list');
  quantity(
    list,
    REF.reference,
    'Reference frequency',
    p.referenceHz,
    UNIT.hertz,
    field('reference frequency'),
  );
  quantity(
    list,
    REF.indication,
    'Indication: mean of the means of both directions of approach',
    r.indicatedHz,
    UNIT.hertz,
    field('indication'),
  );
  quantity(
    list,
    REF.corrected,
    'Indication corrected to the reference conditions of the dial',
    r.correctedHz,
    UNIT.hertz,
    field('corrected indication'),
  );
  const b = r.budget;
  const err = quantity(
    list,
    REF.error,
    'Error: corrected indication minus reference frequency',
    r.errorHz,
    UNIT.hertz,
    field('error'),
    {
      uncertainty: b.expandedHz,
      k: b.coverageFactor,
      p: b.coverageProbability,
      distribution: Number.isFinite(b.effectiveDof)
        ? `t, effective degrees of freedom ${num(b.effectiveDof, 4)}`
        : 'normal',
    },
  );
  const d = r.decision;
  const md = err.ele('dcc:measurementMetaData').ele('dcc:metaData', { refType: REF.conformity });
  md.ele('dcc:norm').txt('ILAC-G8:09/2019');
  rich(md, 'declaration', [
    `${verdictText(d.verdict)}: the error judged against the tolerance (the stated accuracy at this frequency) under the decision rule stated.`,
  ]);
  md.ele('dcc:conformity').txt(CONFORMITY_CODE[d.verdict]);
  const dd = md.ele('dcc:data');
  quantity(dd, REF.tolerance, 'Tolerance (half-width, ±)', d.toleranceHz, UNIT.hertz, field('tolerance'));
  quantity(
    dd,
    REF.acceptanceLimit,
    'Acceptance limit (tolerance less the guard band, ±)',
    d.acceptanceLimitHz,
    UNIT.hertz,
    field('acceptance limit'),
  );
  quantity(
    dd,
    REF.probabilityOfConformity,
    'Probability of conformity (JCGM 106:2012)',
    d.probabilityOfConformity,
    UNIT.one,
    field('probability of conformity'),
  );
}

function measurementResults(root: Node, data: CheckDocumentData): void {
  const { check } = data;
  const list = root.ele('dcc:measurementResults');
  const phases = (['as-found', 'as-left'] as const)
    .map((phase) => ({ phase, points: check.points.filter((p) => p.phase === phase) }))
    .filter((g) => g.points.length > 0);
  for (const g of phases) {
    const mr = list.ele('dcc:measurementResult', {
      refType: g.phase === 'as-found' ? REF.asFound : REF.asLeft,
    });
    text(
      mr,
      'name',
      g.phase === 'as-found'
        ? check.adjusted
          ? 'Results as found (before adjustment)'
          : 'Results as found and as left (not adjusted)'
        : 'Results as left (after adjustment)',
    );
    rich(mr, 'description', [
      'Error = corrected indication minus reference frequency. The expanded uncertainty of the error is given with its coverage factor and coverage probability.',
    ]);
    usedMethods(mr, check.method);
    const sw = mr.ele('dcc:usedSoftware').ele('dcc:software');
    text(sw, 'name', 'Dipledger engine');
    sw.ele('dcc:release').txt(check.engineVersion);
    measuringEquipments(mr, data);
    influenceConditions(mr, data);
    const results = mr.ele('dcc:results');
    for (const p of g.points) pointResult(results, p);
    referenceConditions(mr, data);
  }
}

/** The DCC of an issued certificate, as UTF-8 XML bytes. Throws DccError naming a value D-SI
 * cannot carry. */
export function buildDcc(data: CheckDocumentData): Buffer {
  const doc = create({ version: '1.0', encoding: 'UTF-8' });
  const root = doc.ele(DCC_NS, 'dcc:digitalCalibrationCertificate', {
    'xmlns:si': SI_NS,
    'xmlns:xsi': 'http://www.w3.org/2001/XMLSchema-instance',
    'xsi:schemaLocation': `${DCC_NS} https://ptb.de/dcc/v${DCC_SCHEMA_VERSION}/dcc.xsd`,
    schemaVersion: DCC_SCHEMA_VERSION,
  });
  administrativeData(root, data);
  measurementResults(root, data);
  return Buffer.from(doc.end({ prettyPrint: true }), 'utf8');
}

/** The DCC as the certificate's associated file (PDF/A-3: an alternative form of its content). */
export function dccAttachment(data: CheckDocumentData): Attachment {
  return {
    name: dccFileName(data),
    bytes: buildDcc(data),
    mimeType: DCC_MEDIA_TYPE,
    description: `Digital Calibration Certificate (DCC ${DCC_SCHEMA_VERSION}) of certificate ${data.issue.number} revision ${data.issue.revision}`,
    relationship: 'Alternative',
  };
}
