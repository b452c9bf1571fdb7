// Reads back the numbers of a DCC that Dipledger wrote (app/documents/dcc.ts) and compares each
// one with the signed record it was made from: per point the reference frequency, the
// indication, the corrected indication, the error with its expanded uncertainty, coverage
// factor and probability, the tolerance, the acceptance limit, the probability of conformity
// and the verdict; the bench conditions with their uncertainties; the conformity statements;
// and which certificate and check it names. Elements are found by namespace and by the refType
// codes the writer puts on them, never by position. Used by `verify` and by the tests.
import { create } from 'xmlbuilder2';
import { CONFORMITY_CODE, DCC_NS, REF, SI_NS, UNIT } from './dcc';
import type { CheckDocumentData } from './model';

type CheckRecord = CheckDocumentData['check'];

/** How a difference is worded, per D-SI unit. */
const UNIT_WORDS = {
  [UNIT.hertz]: ' Hz',
  [UNIT.celsius]: ' °C',
  [UNIT.hectopascal]: ' hPa',
  [UNIT.percent]: ' %',
  [UNIT.one]: '',
} as const;

export class DccReadError extends Error {}

export interface DccReal {
  value: number;
  unit: string;
  uncertainty: number | null;
  coverageFactor: number | null;
  coverageProbability: number | null;
}

export interface DccPoint {
  seq: number;
  phase: 'as-found' | 'as-left' | null;
  reference: DccReal | null;
  indication: DccReal | null;
  corrected: DccReal | null;
  error: DccReal | null;
  conformity: string | null;
  tolerance: DccReal | null;
  acceptanceLimit: DccReal | null;
  probabilityOfConformity: DccReal | null;
}

export interface DccConditions {
  temperature: DccReal | null;
  pressure: DccReal | null;
  humidity: DccReal | null;
}

export interface DccContent {
  schemaVersion: string | null;
  certificateNumber: string | null;
  certificateRevision: string | null;
  checkRecord: string | null;
  performanceDate: string | null;
  /** One per measurement result (as found, as left). */
  conditions: DccConditions[];
  points: DccPoint[];
  conformity: { asFound: string | null; asLeft: string | null };
}

function kids(el: Element | null, ns: string, local: string): Element[] {
  if (!el) return [];
  const out: Element[] = [];
  for (let c = el.firstChild; c; c = c.nextSibling)
    if (c.nodeType === 1) {
      const e = c as Element;
      if (e.namespaceURI === ns && e.localName === local) out.push(e);
    }
  return out;
}

const dcc = (el: Element | null, local: string) => kids(el, DCC_NS, local)[0] ?? null;
const si = (el: Element | null, local: string) => kids(el, SI_NS, local)[0] ?? null;
const textOf = (el: Element | null) => (el ? (el.textContent ?? '').trim() : null);

function refTypes(el: Element): string[] {
  return (el.getAttribute('refType') ?? '').split(/\s+/).filter(Boolean);
}

function withRef(els: Element[], ref: string): Element | null {
  return els.find((e) => refTypes(e).includes(ref)) ?? null;
}

function num(el: Element | null): number | null {
  const t = textOf(el);
  return t === null || t === '' ? null : Number(t);
}

function realOf(quantity: Element | null): DccReal | null {
  const r = si(quantity, 'real');
  if (!r) return null;
  const unc = si(r, 'expandedUnc');
  return {
    value: num(si(r, 'value')) ?? Number.NaN,
    unit: textOf(si(r, 'unit')) ?? '',
    uncertainty: num(si(unc, 'uncertainty')),
    coverageFactor: num(si(unc, 'coverageFactor')),
    coverageProbability: num(si(unc, 'coverageProbability')),
  };
}

function identification(core: Element | null, ref: string): string | null {
  const id = withRef(kids(dcc(core, 'identifications'), DCC_NS, 'identification'), ref);
  return textOf(dcc(id, 'value'));
}

function conditionsOf(mr: Element): DccConditions {
  const list = kids(dcc(mr, 'influenceConditions'), DCC_NS, 'influenceCondition');
  const one = (ref: string) => {
    const c = withRef(list, ref);
    return realOf(dcc(dcc(c, 'data'), 'quantity'));
  };
  return { temperature: one(REF.temperature), pressure: one(REF.pressure), humidity: one(REF.humidity) };
}

function pointOf(res: Element, phase: DccPoint['phase']): DccPoint {
  const seq = Number(/^point-(\d+)$/.exec(res.getAttribute('id') ?? '')?.[1] ?? Number.NaN);
  const quantities = kids(dcc(dcc(res, 'data'), 'list'), DCC_NS, 'quantity');
  const q = (ref: string) => withRef(quantities, ref);
  const error = q(REF.error);
  const meta = withRef(kids(dcc(error, 'measurementMetaData'), DCC_NS, 'metaData'), REF.conformity);
  const metaQuantities = kids(dcc(meta, 'data'), DCC_NS, 'quantity');
  const m = (ref: string) => realOf(withRef(metaQuantities, ref));
  return {
    seq,
    phase,
    reference: realOf(q(REF.reference)),
    indication: realOf(q(REF.indication)),
    corrected: realOf(q(REF.corrected)),
    error: realOf(error),
    conformity: textOf(dcc(meta, 'conformity')),
    tolerance: m(REF.tolerance),
    acceptanceLimit: m(REF.acceptanceLimit),
    probabilityOfConformity: m(REF.probabilityOfConformity),
  };
}

/** Parses a DCC's bytes. Throws DccReadError when they are not a DCC. */
export function readDcc(bytes: Buffer): DccContent {
  let root: Element | null;
  try {
    const doc = create(bytes.toString('utf8')).node as unknown as Document;
    root = doc.documentElement;
  } catch (e) {
    throw new DccReadError(`not well-formed XML (${e instanceof Error ? e.message : String(e)})`);
  }
  if (!root || root.namespaceURI !== DCC_NS || root.localName !== 'digitalCalibrationCertificate')
    throw new DccReadError('the root element is not dcc:digitalCalibrationCertificate');
  const admin = dcc(root, 'administrativeData');
  const core = dcc(admin, 'coreData');
  const statements = kids(dcc(admin, 'statements'), DCC_NS, 'statement');
  const verdictOf = (ref: string) =>
    textOf(
      dcc(
        statements.find((s) => refTypes(s).includes(REF.conformity) && refTypes(s).includes(ref)) ?? null,
        'conformity',
      ),
    );
  const content: DccContent = {
    schemaVersion: root.getAttribute('schemaVersion'),
    certificateNumber: identification(core, REF.certificateNumber),
    certificateRevision: identification(core, REF.certificateRevision),
    checkRecord: identification(core, REF.checkRecord),
    performanceDate: textOf(dcc(core, 'beginPerformanceDate')),
    conditions: [],
    points: [],
    conformity: { asFound: verdictOf(REF.asFound), asLeft: verdictOf(REF.asLeft) },
  };
  for (const mr of kids(dcc(root, 'measurementResults'), DCC_NS, 'measurementResult')) {
    const refs = refTypes(mr);
    const phase = refs.includes(REF.asFound) ? 'as-found' : refs.includes(REF.asLeft) ? 'as-left' : null;
    content.conditions.push(conditionsOf(mr));
    for (const res of kids(dcc(mr, 'results'), DCC_NS, 'result')) content.points.push(pointOf(res, phase));
  }
  return content;
}

/** Every way the DCC differs from the signed record, in words; empty when they agree. */
export function compareDcc(
  d: DccContent,
  check: CheckRecord,
  issue: { number: string; revision: number },
): string[] {
  const problems: string[] = [];
  const same = (what: string, got: string | null, want: string) => {
    if (got !== want) problems.push(`${what}: the DCC says ${got ?? 'nothing'}, the record ${want}`);
  };
  const real = (what: string, got: DccReal | null, want: number, unit: keyof typeof UNIT_WORDS) => {
    if (!got) return problems.push(`${what}: missing from the DCC`);
    const u = UNIT_WORDS[unit];
    if (got.unit !== unit)
      problems.push(`${what}: the DCC gives the unit ${got.unit || 'none'}, expected ${unit}`);
    else if (got.value !== want)
      problems.push(`${what}: the DCC says ${got.value}${u}, the record ${want}${u}`);
    return undefined;
  };
  const exact = (what: string, got: number | null | undefined, want: number) => {
    if (got !== want) problems.push(`${what}: the DCC says ${got ?? 'nothing'}, the record ${want}`);
  };

  same('certificate number', d.certificateNumber, issue.number);
  same('certificate revision', d.certificateRevision, String(issue.revision));
  same('check record', d.checkRecord, `${check.checkId} revision ${check.revision}`);
  same('date of calibration', d.performanceDate, check.date);

  const c = check.conditions;
  if (d.conditions.length === 0) problems.push('conditions: missing from the DCC');
  d.conditions.forEach((k, i) => {
    const at = d.conditions.length > 1 ? ` (results ${i + 1})` : '';
    real(`air temperature${at}`, k.temperature, c.temperatureC, UNIT.celsius);
    exact(`air temperature uncertainty${at}`, k.temperature?.uncertainty, c.temperatureUncertaintyC);
    real(`air pressure${at}`, k.pressure, c.pressureHpa, UNIT.hectopascal);
    exact(`air pressure uncertainty${at}`, k.pressure?.uncertainty, c.pressureUncertaintyHpa);
    real(`relative humidity${at}`, k.humidity, c.humidityPct, UNIT.percent);
    exact(`relative humidity uncertainty${at}`, k.humidity?.uncertainty, c.humidityUncertaintyPct);
  });

  if (d.points.length !== check.points.length)
    problems.push(`points: the DCC has ${d.points.length}, the record ${check.points.length}`);
  for (const p of check.points) {
    const q = d.points.find((x) => x.seq === p.seq);
    const at = `point ${p.seq}`;
    if (!q) {
      problems.push(`${at}: missing from the DCC`);
      continue;
    }
    const r = p.result;
    if (q.phase !== p.phase)
      problems.push(`${at}: the DCC gives it ${q.phase ?? 'no phase'}, the record ${p.phase}`);
    real(`${at} reference frequency`, q.reference, p.referenceHz, UNIT.hertz);
    real(`${at} indication`, q.indication, r.indicatedHz, UNIT.hertz);
    real(`${at} corrected indication`, q.corrected, r.correctedHz, UNIT.hertz);
    real(`${at} error`, q.error, r.errorHz, UNIT.hertz);
    exact(`${at} expanded uncertainty (Hz)`, q.error?.uncertainty, r.budget.expandedHz);
    exact(`${at} coverage factor`, q.error?.coverageFactor, r.budget.coverageFactor);
    exact(`${at} coverage probability`, q.error?.coverageProbability, r.budget.coverageProbability);
    same(`${at} verdict`, q.conformity, CONFORMITY_CODE[r.decision.verdict]);
    real(`${at} tolerance`, q.tolerance, r.decision.toleranceHz, UNIT.hertz);
    real(`${at} acceptance limit`, q.acceptanceLimit, r.decision.acceptanceLimitHz, UNIT.hertz);
    real(
      `${at} probability of conformity`,
      q.probabilityOfConformity,
      r.decision.probabilityOfConformity,
      UNIT.one,
    );
  }

  const verdictCode = (v: CheckRecord['asFoundVerdict']) => (v ? CONFORMITY_CODE[v] : 'nothing');
  same(
    'statement of conformity as found',
    d.conformity.asFound ?? 'nothing',
    verdictCode(check.asFoundVerdict),
  );
  if (check.adjusted)
    same(
      'statement of conformity as left',
      d.conformity.asLeft ?? 'nothing',
      verdictCode(check.asLeftVerdict),
    );
  return problems;
}
