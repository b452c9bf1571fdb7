// Validating a check document against the lab's records and computing every point; writes
// nothing. Used by recording, amending and importing checks alike.
import { checkInBand } from '../../engine';
import type { Reading } from '../../engine/model';
import { findCheckId } from '../../../db/queries/checks';
import { checkDatesOfMeter } from '../../../db/queries/check-dates';
import { getMeterByAsset, type MeterRecord } from '../../../db/queries/meters';
import { findPersonByName, listPeople } from '../../../db/queries/people';
import { getStandardByAsset, type StandardRecord } from '../../../db/queries/standards';
import type { LabSettings, Person } from '../contract';
import { LabError, describe } from '../errors';
import { frequencyOrIssue, Issues, parseWith } from '../issues';
import type { ServiceContext } from '../ops/context';
import { certificateOn, requireLab } from '../ops/lookups';
import { CheckDocumentSchema } from '../schemas';
import { prepareSweepPoint } from './sweep-point';
import type { PreparedCheck, PreparedPoint } from './prepared';
import { conditionsOf, evaluateOrIssue, readingValue } from './readings';
import { worstVerdict } from './spec';

/** Records a bulk import reads for every check and no check changes (the lab's settings, meters,
 * standards, people), looked up once per import instead of once per check. A performer the
 * import itself creates stays "not found" here for the rest of the import: writeCheck finds or
 * creates them by name, so every check still gets the one person. */
export interface ImportLookups {
  settings?: LabSettings;
  meters: Map<string, MeterRecord | undefined>;
  standards: Map<string, StandardRecord | undefined>;
  /** Made on first use. */
  people?: Map<string, Person | undefined>;
  /** By meter asset id: the dates of its checks in the file, and of those this import prepared
   * (made on first use). A date not there cannot be a duplicate, so the check is not looked up. */
  checkDates?: Map<string, Set<string>>;
}

function lookedUp<T>(memo: Map<string, T> | undefined, key: string, find: () => T): T {
  if (!memo) return find();
  if (memo.has(key)) return memo.get(key) as T;
  const found = find();
  memo.set(key, found);
  return found;
}
/** Validates a check document against the records and computes every point. Writes nothing. */
export function prepareCheck(
  ctx: ServiceContext,
  input: unknown,
  prefix: string,
  options: { createPerformer: boolean; amendingCheckId?: number; lookups?: ImportLookups },
): PreparedCheck {
  const doc = parseWith(CheckDocumentSchema, input, prefix);
  const lookups = options.lookups;
  const settings = lookups ? (lookups.settings ??= requireLab(ctx)) : requireLab(ctx);
  const issues = new Issues();
  const f = (name: string) => (prefix ? `${prefix}.${name}` : name);

  const meter = lookedUp(lookups?.meters, doc.meter, () => getMeterByAsset(ctx.db, doc.meter));
  if (!meter) {
    issues.add(
      f('meter'),
      doc.meter,
      'the asset id of a meter in this lab',
      `${f('meter')}: no meter ${describe(doc.meter)} in this lab`,
    );
    issues.throwIfAny();
    throw new Error('unreachable');
  }
  if (meter.meter.state === 'withdrawn') {
    issues.add(
      f('meter'),
      doc.meter,
      'a meter that is not withdrawn',
      `${f('meter')}: ${doc.meter} is withdrawn; return it to service first`,
    );
  }
  const today = ctx.clock.today();
  if (doc.date > today) {
    issues.add(
      f('date'),
      doc.date,
      `a date on or before today (${today})`,
      `${f('date')}: ${doc.date} is in the future (today is ${today})`,
    );
  }
  const performer = lookedUp(
    lookups && (lookups.people ??= new Map<string, Person | undefined>()),
    doc.performer,
    () => findPersonByName(ctx.db, doc.performer),
  );
  if (!performer && !options.createPerformer) {
    const known = listPeople(ctx.db).map((p) => p.name);
    issues.add(
      f('performer'),
      doc.performer,
      `one of the lab's people: ${known.join(', ') || '(none yet)'}`,
      `${f('performer')}: ${describe(doc.performer)} is not one of the lab's people (${known.join(', ') || 'none yet'})`,
    );
  }

  const standards: PreparedCheck['standards'] = [];
  const exceptions: string[] = [];
  doc.standards.forEach((assetId, i) => {
    const field = f(`standards[${i}]`);
    const s = lookedUp(lookups?.standards, assetId, () => getStandardByAsset(ctx.db, assetId));
    if (!s) {
      issues.add(
        field,
        assetId,
        'the asset id of a lab standard',
        `${field}: no lab standard ${describe(assetId)} in this lab`,
      );
      return;
    }
    if (s.retiredOn && doc.date > s.retiredOn) {
      issues.add(
        field,
        assetId,
        'a lab standard in use on the check date',
        `${field}: ${assetId} was retired on ${s.retiredOn}, before ${doc.date}`,
      );
      return;
    }
    const cert = certificateOn(s, doc.date);
    // A permissive lab records the check against the certificate nearest before the date,
    // with an exception shown on the record; a strict lab refuses it.
    const nearest =
      settings.traceabilityPolicy === 'permissive' && !cert
        ? (s.certificates.find((c) => c.calibratedOn <= doc.date) ??
          s.certificates[s.certificates.length - 1])
        : undefined;
    if (!cert && nearest) {
      exceptions.push(
        `${assetId} had no valid calibration on ${doc.date} (certificate ${nearest.certificateId}, ` +
          `${nearest.calibratedOn} to ${nearest.dueOn}); recorded under the lab's permissive traceability policy`,
      );
      standards.push({ record: s, certificate: nearest });
      return;
    }
    if (!cert) {
      const newest = s.certificates[0];
      issues.add(
        field,
        assetId,
        'a standard whose calibration was valid on the check date',
        `${field}: ${assetId} had no valid calibration on ${doc.date}` +
          (newest
            ? ` (newest certificate ${newest.certificateId}, ${newest.calibratedOn} to ${newest.dueOn})`
            : '') +
          "; the lab's traceability policy is strict",
      );
      return;
    }
    standards.push({ record: s, certificate: cert });
  });

  const conditions = conditionsOf(doc, settings);
  const m = meter.meter;
  const points: PreparedPoint[] = [];
  doc.points.forEach((p, i) => {
    const pf = f(`points[${i}]`);
    // Sweep method: a dial graduation and the resonance fitted to its trace, judged
    // with the fit's u(f0); sweep-point.ts validates it and returns the same PreparedPoint.
    if (p.sweep !== undefined) {
      const swept = prepareSweepPoint({
        issues,
        field: pf,
        point: p,
        method: doc.method,
        meter: m,
        conditions,
        standards,
        listedStandards: doc.standards,
        rule: settings.decisionRule,
        readingValue,
      });
      if (swept) points.push(swept);
      return;
    }
    // The schema requires a reference on every point that is not swept.
    const referenceHz = frequencyOrIssue(issues, p.reference ?? '', `${pf}.reference`);
    if (referenceHz !== undefined) {
      const out = checkInBand(referenceHz, m.minHz, m.maxHz, `${pf}.reference`);
      if (out)
        issues.fromParse(`${pf}.reference`, p.reference, out, `a frequency inside the band of ${m.assetId}`);
    }
    const stdAsset = p.standard ?? doc.standards[0];
    const std = standards.find((s) => s.record.assetId === stdAsset);
    if (p.standard !== undefined && !doc.standards.includes(p.standard)) {
      issues.add(
        `${pf}.standard`,
        p.standard,
        'one of the standards listed for this check',
        `${pf}.standard: ${describe(p.standard)} is not listed in standards`,
      );
    }
    const readings: Reading[] = [];
    p.readings.forEach((r, j) => {
      const v = readingValue(issues, m, r.value, `${pf}.readings[${j}].value`);
      if (v !== undefined) readings.push({ value: v, direction: r.direction });
    });
    if (referenceHz === undefined || !std || readings.length !== p.readings.length || issues.list.length > 0)
      return;
    const result = evaluateOrIssue(
      issues,
      pf,
      m,
      conditions,
      referenceHz,
      std.certificate,
      readings,
      settings.decisionRule,
    );
    if (!result) return;
    points.push({
      phase: p.phase,
      referenceHz,
      standard: std.record,
      certificate: std.certificate,
      readings,
      dipDepthDb: p.dipDepthDb ?? null,
      result,
    });
  });

  const asLeftPoints = doc.points.filter((p) => p.phase === 'as-left').length;
  if (doc.adjusted && asLeftPoints === 0) {
    issues.add(
      f('adjusted'),
      true,
      'as-left points after an adjustment',
      `${f('adjusted')}: the meter was adjusted but no point is marked "as-left"`,
    );
  }
  if (!doc.adjusted && asLeftPoints > 0) {
    issues.add(
      f('adjusted'),
      false,
      'adjusted: true when as-left points are given',
      `${f('adjusted')}: as-left points are given but adjusted is false`,
    );
  }
  const dates =
    lookups &&
    lookedUp((lookups.checkDates ??= new Map<string, Set<string>>()), doc.meter, () =>
      checkDatesOfMeter(ctx.db, meter.id),
    );
  const dup = dates && !dates.has(doc.date) ? undefined : findCheckId(ctx.db, meter.id, doc.date);
  if (dup !== undefined && dup !== options.amendingCheckId) {
    issues.add(
      f('date'),
      doc.date,
      'one check per meter and date',
      `${f('date')}: a check of ${m.assetId} on ${doc.date} is already recorded (check ${dup}); amend it instead`,
    );
  }
  issues.throwIfAny();
  // Written next: a later check of this import on the same meter and date is looked up.
  dates?.add(doc.date);

  const found = points.filter((p) => p.phase === 'as-found');
  const left = doc.adjusted ? points.filter((p) => p.phase === 'as-left') : found;
  const asFoundVerdict = worstVerdict(found.map((p) => p.result.decision.verdict));
  const asLeftVerdict = worstVerdict(left.map((p) => p.result.decision.verdict));
  const worstUsedFraction = left.length
    ? Math.max(...left.map((p) => Math.abs(p.result.errorHz) / p.result.decision.toleranceHz))
    : null;
  return {
    doc,
    meter,
    performer,
    conditions,
    standards,
    points,
    asFoundVerdict,
    asLeftVerdict,
    worstUsedFraction,
    exceptions,
  };
}

/** A check rebuilt from CSV rows, with the line numbers it came from for messages. */
export function prepareCheckAtLine(
  ctx: ServiceContext,
  d: { doc: unknown; lines: string },
  lookups: ImportLookups,
): PreparedCheck {
  try {
    return prepareCheck(ctx, d.doc, '', { createPerformer: true, lookups });
  } catch (e) {
    if (e instanceof LabError) {
      const issues = e.issues.map((i) => ({
        ...i,
        field: `lines ${d.lines}: ${i.field}`,
        message: `lines ${d.lines}: ${i.message}`,
      }));
      throw new LabError(e.code, issues[0]?.message ?? `lines ${d.lines}: ${e.message}`, issues);
    }
    throw e;
  }
}
