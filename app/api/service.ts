// The LabApi implemented over a lab file. Validates every input (shape with zod, meaning
// against the records), computes with the engine, and writes each operation in one
// transaction: a refusal writes nothing.
import { stringify as stringifyCsv } from 'csv-stringify/sync';
import { CSV_COLUMNS, csvToDocuments } from './import-csv';
import {
  checkInBand,
  formatFrequency,
  evaluatePoint,
  parseDivisions,
  parseFrequencyHz,
  refractivityN,
  waterVapourPressureHpa,
} from '../engine';
import type { Conditions, DecisionRule, PointResult, Reading, Verdict } from '../engine/model';
import type { LabDb } from '../../db/store';
import { getLab, putLab } from '../../db/queries/lab';
import { findPersonByName, insertPerson, listPeople } from '../../db/queries/people';
import {
  getStandardByAsset,
  insertStandard,
  listStandards,
  type StandardRecord,
} from '../../db/queries/standards';
import {
  getMeterByAsset,
  insertMeter,
  registerRows,
  setMeterState,
  type MeterRecord,
} from '../../db/queries/meters';
import {
  allCheckIds,
  findCheckId,
  getCheck,
  listCheckSummaries,
  revisionRowData,
} from '../../db/queries/checks';
import { writeCheckRows, type CheckWrite } from './check-write';
import { importWriterFor } from './import-writer';
import { appendAudit } from '../../db/queries/audit';
import { checkDatesOfMeter } from '../../db/queries/check-dates';
import type { SweepData } from '../../db/queries/sweeps';
import { prepareSweepPoint } from './sweep-points';
import type {
  AirResult,
  ImportResult,
  LabApi,
  LabSettings,
  OperationName,
  Meter,
  MeterDetail,
  Person,
  RegisterRow,
  Standard,
} from './contract';
import { OPERATIONS } from './contract';
import { LabError, describe } from './errors';
import {
  Issues,
  addMonthsIso,
  daysBetween,
  frequencyOrIssue,
  parseWith,
  specOf,
  systemClock,
  worstVerdict,
  type Clock,
} from './support';
import type { ServiceContext, SyncOps } from './context';
import { revisionRows, sweepRows } from './check-rows';
import type { CoreApi } from './contract';
import { draftsOps } from './ops-drafts';
import { recordsOps } from './ops-records';
import { historyOps, registerFlagsAll } from './ops-history';
import { registerRowOfMeter } from '../../db/queries/summaries';
import { sweepOps } from './ops-sweep';
import { documentsOps } from './ops-documents';
import { dccOps } from './ops-dcc';

export { fixedClock, systemClock, worstVerdict, addMonthsIso, daysBetween, type Clock } from './support';
import {
  AirSchema,
  BudgetDocumentSchema,
  CheckDocumentSchema,
  LabSettingsSchema,
  MeterSchema,
  MeterStateSchema,
  PersonSchema,
  StandardSchema,
  type CheckDocument,
} from './schemas';

export interface PreparedPoint {
  phase: 'as-found' | 'as-left';
  referenceHz: number;
  standard: StandardRecord;
  certificate: StandardRecord['certificates'][number];
  readings: Reading[];
  dipDepthDb: number | null;
  result: PointResult;
  /** Sweep method (issue 3): the graduation set, the raw trace and its fit; stored by writeCheck. */
  sweep?: SweepData;
}

export interface PreparedCheck {
  doc: CheckDocument;
  meter: MeterRecord;
  performer: Person | undefined;
  conditions: Conditions;
  standards: { record: StandardRecord; certificate: StandardRecord['certificates'][number] }[];
  points: PreparedPoint[];
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  worstUsedFraction: number | null;
  /** Standards used outside their calibration, let through by a permissive lab policy. */
  exceptions: string[];
}

/** Records a bulk import reads for every check and no check changes (the lab's settings, meters,
 * standards, people), looked up once per import instead of once per check. A performer the
 * import itself creates stays "not found" here for the rest of the import: writeCheck finds or
 * creates them by name, so every check still gets the one person. */
interface ImportLookups {
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

export interface ServiceOptions {
  clock?: Clock;
  /** Who the operations are recorded as in the audit trail until people sign in (records issue). */
  actor?: string;
  /** The fewest checks an import hands to a writer thread (WRITER_THREAD_MIN_CHECKS; Infinity:
   * never, as for a lab with no file of its own). */
  writerThreadMinChecks?: number;
}

export function createLabService(db: LabDb, options: ServiceOptions = {}): LabApi {
  const clock = options.clock ?? systemClock;
  const actor = options.actor ?? 'local user';

  function lab(): LabSettings {
    const settings = getLab(db);
    if (!settings)
      throw new LabError('refused', 'this lab file has no lab settings yet: run "dipledger init"');
    return settings;
  }

  function meterOr404(assetId: string): MeterRecord {
    const m = getMeterByAsset(db, assetId);
    if (!m) throw new LabError('not-found', `no meter with asset id ${describe(assetId)} in this lab`, []);
    return m;
  }

  function registerRow(r: ReturnType<typeof registerRows>[number]): RegisterRow {
    // A withdrawn meter is out of use: nothing falls due for it.
    const dueDate =
      r.lastCheckDate && r.state !== 'withdrawn' ? addMonthsIso(r.lastCheckDate, r.intervalMonths) : null;
    return { ...r, dueDate, daysToDue: dueDate ? daysBetween(clock.today(), dueDate) : null };
  }

  function certificateOn(
    s: StandardRecord,
    date: string,
  ): StandardRecord['certificates'][number] | undefined {
    return s.certificates.find((c) => c.calibratedOn <= date && date <= c.dueOn);
  }

  function toStandard(s: StandardRecord): Standard {
    const newest = s.certificates[0];
    const dueOn = newest?.dueOn ?? '';
    return {
      assetId: s.assetId,
      description: s.description,
      certificates: s.certificates.map(({ id: _id, ...c }) => c),
      dueOn,
      daysToDue: dueOn ? daysBetween(clock.today(), dueOn) : 0,
    };
  }

  /** Parses one reading in dial units: Hz for direct-reading meters, divisions otherwise. */
  function readingValue(
    issues: Issues,
    meter: Meter,
    value: string | number,
    field: string,
  ): number | undefined {
    if (meter.dialKind === 'direct') {
      const hz = frequencyOrIssue(issues, value, field);
      if (hz === undefined) return undefined;
      // A meter read at its band edge may show its own error: allow twice the stated accuracy.
      const slack = 2 * (meter.accuracyRelPpm * 1e-6);
      if (checkInBand(hz, meter.minHz * (1 - slack), meter.maxHz * (1 + slack), field)) {
        const bandText = `${formatFrequency(meter.minHz, 4)} to ${formatFrequency(meter.maxHz, 4)}`;
        issues.fromParse(
          field,
          value,
          `${field}: ${describe(value)} is outside the band of ${meter.assetId} (${bandText})`,
          `a reading inside the band of ${meter.assetId}`,
        );
        return undefined;
      }
      return hz;
    }
    const d = parseDivisions(value, field);
    if (!d.ok) {
      issues.fromParse(field, value, d.message, 'a dial reading in divisions, such as 12.345');
      return undefined;
    }
    const first = meter.chart[0];
    const last = meter.chart[meter.chart.length - 1];
    if (first && last) {
      const lo = Math.min(first.divisions, last.divisions);
      const hi = Math.max(first.divisions, last.divisions);
      if (d.divisions < lo || d.divisions > hi) {
        issues.fromParse(
          field,
          value,
          `${field}: ${describe(value)} divisions is outside the chart of ${meter.assetId} (${lo} to ${hi} div)`,
          `a reading from ${lo} to ${hi} divisions`,
        );
        return undefined;
      }
    }
    return d.divisions;
  }

  function conditionsOf(doc: { conditions: CheckDocument['conditions'] }, settings: LabSettings): Conditions {
    const c = doc.conditions;
    return {
      temperatureC: c.temperatureC,
      temperatureUncertaintyC: c.temperatureUncertaintyC ?? settings.defaultTemperatureUncertaintyC,
      pressureHpa: c.pressureHpa,
      pressureUncertaintyHpa: c.pressureUncertaintyHpa ?? settings.defaultPressureUncertaintyHpa,
      humidityPct: c.humidityPct,
      humidityUncertaintyPct: c.humidityUncertaintyPct ?? settings.defaultHumidityUncertaintyPct,
    };
  }

  function evaluateOrIssue(
    issues: Issues,
    field: string,
    meter: Meter,
    conditions: Conditions,
    referenceHz: number,
    certificate: StandardRecord['certificates'][number],
    readings: Reading[],
    rule: DecisionRule,
  ): PointResult | undefined {
    try {
      return evaluatePoint(
        specOf(meter),
        conditions,
        {
          reference: {
            frequencyHz: referenceHz,
            expandedUncertaintyPpm: certificate.expandedUncertaintyPpm,
            coverageFactor: certificate.coverageFactor,
          },
          readings,
        },
        rule,
      );
    } catch (e) {
      issues.fromParse(
        field,
        undefined,
        `${field}: ${e instanceof Error ? e.message : String(e)}`,
        'readings that can be judged',
      );
      return undefined;
    }
  }

  /** Validates a check document against the records and computes every point. Writes nothing. */
  function prepareCheck(
    input: unknown,
    prefix: string,
    options: { createPerformer: boolean; amendingCheckId?: number; lookups?: ImportLookups },
  ): PreparedCheck {
    const doc = parseWith(CheckDocumentSchema, input, prefix);
    const lookups = options.lookups;
    const settings = lookups ? (lookups.settings ??= lab()) : lab();
    const issues = new Issues();
    const f = (name: string) => (prefix ? `${prefix}.${name}` : name);

    const meter = lookedUp(lookups?.meters, doc.meter, () => getMeterByAsset(db, doc.meter));
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
    const today = clock.today();
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
      () => findPersonByName(db, doc.performer),
    );
    if (!performer && !options.createPerformer) {
      const known = listPeople(db).map((p) => p.name);
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
      const s = lookedUp(lookups?.standards, assetId, () => getStandardByAsset(db, assetId));
      if (!s) {
        issues.add(
          field,
          assetId,
          'the asset id of a lab standard',
          `${field}: no lab standard ${describe(assetId)} in this lab`,
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
      // Sweep method (issue 3): a dial graduation and the resonance fitted to its trace, judged
      // with the fit's u(f0); sweep-points.ts validates it and returns the same PreparedPoint.
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
          issues.fromParse(
            `${pf}.reference`,
            p.reference,
            out,
            `a frequency inside the band of ${m.assetId}`,
          );
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
      if (
        referenceHz === undefined ||
        !std ||
        readings.length !== p.readings.length ||
        issues.list.length > 0
      )
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
        checkDatesOfMeter(db, meter.id),
      );
    const dup = dates && !dates.has(doc.date) ? undefined : findCheckId(db, meter.id, doc.date);
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

  /** `settings`: the lab's, when the caller already read them (a bulk import, once per file). */
  function writeCheck(c: PreparedCheck, action: string, settings?: LabSettings): number {
    return writeCheckRows(db, checkWriteOf(c, action, settings));
  }

  /** A prepared check as the rows written for it (packed results included). */
  function checkWriteOf(c: PreparedCheck, action: string, settings?: LabSettings): CheckWrite {
    const rule = (settings ?? lab()).decisionRule;
    // The performer's id is settled where the check is written (writeCheckRows).
    const { performerId, ...revision } = revisionRowData(revisionRows(c, c.performer?.id ?? 0, rule));
    return {
      at: clock.now(),
      actor,
      action,
      performerId: c.performer ? performerId : undefined,
      performerName: c.doc.performer,
      revision,
      sweeps: sweepRows(c),
      audit: {
        meter: c.meter.meter.assetId,
        date: c.doc.date,
        asFound: c.asFoundVerdict,
        asLeft: c.asLeftVerdict,
      },
    };
  }

  // What operation groups in other files may use; they get the same validation and helpers.
  const ctx: ServiceContext = {
    db,
    clock,
    actor,
    lab,
    meterOr404,
    registerRow,
    certificateOn,
    readingValue,
    conditionsOf,
    evaluateOrIssue,
    prepareCheck,
    writeCheck,
  };

  const core: SyncOps<CoreApi> = {
    getLab() {
      return lab();
    },

    updateLab(input) {
      const settings = parseWith(LabSettingsSchema, input);
      if (settings.intervalMinMonths > settings.intervalMaxMonths) {
        throw LabError.field(
          'intervalMinMonths',
          settings.intervalMinMonths,
          `at most intervalMaxMonths (${settings.intervalMaxMonths})`,
        );
      }
      const before = getLab(db);
      db.transaction(() => {
        putLab(db, settings);
        appendAudit(db, {
          at: clock.now(),
          actor,
          action: before ? 'update' : 'create',
          entity: 'lab',
          entityId: '1',
          before,
          after: settings,
        });
      })();
      return lab();
    },

    listMeters() {
      return registerRows(db).map(registerRow);
    },

    getMeter(assetId) {
      // String() of a hostile object throws a TypeError; refuse anything but text (found by
      // test/api/records-fuzz.test.ts).
      if (typeof assetId !== 'string')
        throw LabError.field('assetId', assetId, 'the asset id of a meter, as text');
      const rec = meterOr404(assetId);
      const row = registerRowOfMeter(db, rec.id);
      if (!row) throw new LabError('internal', `register row missing for ${rec.meter.assetId}`);
      const detail: MeterDetail = {
        meter: rec.meter,
        register: registerRow(row),
        checks: listCheckSummaries(db, rec.id),
      };
      return detail;
    },

    createMeter(input) {
      const m = parseWith(MeterSchema, input);
      const issues = new Issues();
      const minHz = frequencyOrIssue(issues, m.min, 'min');
      const maxHz = frequencyOrIssue(issues, m.max, 'max');
      const absHz = parseFrequencyHz(m.accuracyAbs, 'accuracyAbs');
      const accuracyAbsHz = absHz.ok ? absHz.hz : 0;
      if (!absHz.ok && !/^\s*0(\.0*)?\s*[a-z]*\s*$/i.test(String(m.accuracyAbs))) {
        issues.fromParse('accuracyAbs', m.accuracyAbs, absHz.message, 'a frequency such as "10 kHz"');
      }
      if (minHz !== undefined && maxHz !== undefined && !(maxHz > minHz)) {
        issues.add('max', m.max, `a frequency above min (${describe(m.min)})`);
      }
      let resolution: number | undefined;
      if (m.dialKind === 'direct') {
        const r = parseFrequencyHz(m.resolution, 'resolution');
        // A resolution is small (kHz to MHz), so a bare number is always ambiguous here.
        if (r.ok && typeof m.resolution === 'string' && /[a-z]/i.test(m.resolution)) resolution = r.hz;
        else
          issues.add(
            'resolution',
            m.resolution,
            'the dial resolution as a frequency with unit, such as "1 MHz"',
          );
      } else {
        const d = parseDivisions(m.resolution, 'resolution');
        if (d.ok && d.divisions > 0) resolution = d.divisions;
        else issues.add('resolution', m.resolution, 'the dial resolution in divisions, such as 0.01');
      }
      const chart = m.chart.map((c, i) => ({
        divisions: c.divisions,
        frequencyHz: frequencyOrIssue(issues, c.frequency, `chart[${i}].frequency`) ?? NaN,
      }));
      if (m.dialKind === 'divisions') {
        if (chart.length < 2)
          issues.add('chart', m.chart, 'a chart of at least two points for a divisions meter');
        const sorted = [...chart].sort((a, b) => a.divisions - b.divisions);
        const up = sorted.every(
          (c, i) => i === 0 || c.frequencyHz > (sorted[i - 1]?.frequencyHz ?? -Infinity),
        );
        const down = sorted.every(
          (c, i) => i === 0 || c.frequencyHz < (sorted[i - 1]?.frequencyHz ?? Infinity),
        );
        if (chart.length >= 2 && !up && !down)
          issues.add('chart', m.chart, 'a chart whose frequency rises or falls steadily with divisions');
      }
      const planHz: number[] = [];
      m.plan.forEach((p, i) => {
        const hz = frequencyOrIssue(issues, p, `plan[${i}]`);
        if (hz === undefined || minHz === undefined || maxHz === undefined) return;
        const out = checkInBand(hz, minHz, maxHz, `plan[${i}]`);
        if (out) issues.fromParse(`plan[${i}]`, p, out, 'a frequency inside the band');
        else planHz.push(hz);
      });
      if (getMeterByAsset(db, m.assetId))
        issues.add(
          'assetId',
          m.assetId,
          'an asset id not already in the register',
          `assetId: ${m.assetId} is already in the register`,
        );
      issues.throwIfAny();
      const meter: Meter = {
        assetId: m.assetId,
        description: m.description,
        construction: m.construction,
        port: m.port,
        minHz: minHz as number,
        maxHz: maxHz as number,
        dialKind: m.dialKind,
        accuracyRelPpm: m.accuracyRelPpm,
        accuracyAbsHz,
        resolution: resolution as number,
        chart: m.dialKind === 'divisions' ? chart : [],
        alphaPerK: m.alphaPerK,
        alphaUncertaintyPerK: m.alphaUncertaintyPerK,
        reference: m.reference,
        loadedQ: m.loadedQ,
        settingFraction: m.settingFraction,
        minDipDb: m.minDipDb,
        maxInputPowerW: m.maxInputPowerW,
        location: m.location,
        state: m.state,
        intervalMonths: m.intervalMonths,
        planHz: [...new Set(planHz)].sort((a, b) => a - b),
      };
      db.transaction(() => {
        const at = clock.now();
        insertMeter(db, meter, at);
        appendAudit(db, {
          at,
          actor,
          action: 'create',
          entity: 'meter',
          entityId: meter.assetId,
          before: undefined,
          after: meter,
        });
      })();
      return meterOr404(meter.assetId).meter;
    },

    changeMeterState(input) {
      const c = parseWith(MeterStateSchema, input);
      const rec = meterOr404(c.assetId);
      if (rec.meter.state === c.state) {
        throw LabError.field(
          'state',
          c.state,
          `a state other than the present one (${rec.meter.state})`,
          `state: ${c.assetId} is already ${c.state}`,
        );
      }
      db.transaction(() => {
        setMeterState(db, rec.id, c.state);
        appendAudit(db, {
          at: clock.now(),
          actor,
          action: 'change-state',
          entity: 'meter',
          entityId: c.assetId,
          before: { state: rec.meter.state },
          after: { state: c.state, reason: c.reason },
        });
      })();
      return meterOr404(c.assetId).meter;
    },

    listDue(query) {
      const within = Number(query?.withinDays);
      if (!Number.isInteger(within) || within < 0 || within > 3650) {
        throw LabError.field('withinDays', query?.withinDays, 'a whole number of days from 0 to 3650');
      }
      const rows = registerRows(db)
        .map(registerRow)
        .filter((r) => r.state !== 'withdrawn' && (r.daysToDue === null || r.daysToDue <= within))
        .sort((a, b) => (a.daysToDue ?? -Infinity) - (b.daysToDue ?? -Infinity));
      const flags = registerFlagsAll(ctx, rows);
      return rows.map((r, i) => ({ ...r, flags: flags[i] ?? [] }));
    },

    listStandards() {
      return listStandards(db).map(toStandard);
    },

    createStandard(input) {
      const s = parseWith(StandardSchema, input);
      const issues = new Issues();
      s.certificates.forEach((c, i) => {
        if (c.dueOn <= c.calibratedOn)
          issues.add(`certificates[${i}].dueOn`, c.dueOn, `a date after calibratedOn (${c.calibratedOn})`);
      });
      if (getStandardByAsset(db, s.assetId))
        issues.add(
          'assetId',
          s.assetId,
          'an asset id not already used',
          `assetId: ${s.assetId} is already a lab standard`,
        );
      const ids = new Set<string>();
      s.certificates.forEach((c, i) => {
        if (ids.has(c.certificateId))
          issues.add(`certificates[${i}].certificateId`, c.certificateId, 'certificate numbers that differ');
        ids.add(c.certificateId);
      });
      issues.throwIfAny();
      db.transaction(() => {
        const at = clock.now();
        insertStandard(db, s, at);
        appendAudit(db, {
          at,
          actor,
          action: 'create',
          entity: 'standard',
          entityId: s.assetId,
          before: undefined,
          after: s,
        });
      })();
      const rec = getStandardByAsset(db, s.assetId);
      if (!rec) throw new LabError('internal', 'standard not found after writing it');
      return toStandard(rec);
    },

    listPeople() {
      return listPeople(db);
    },

    createPerson(input) {
      const p = parseWith(PersonSchema, input);
      if (findPersonByName(db, p.name))
        throw LabError.field(
          'name',
          p.name,
          'a name not already in the lab',
          `name: ${p.name} is already one of the lab's people`,
        );
      let person: Person | undefined;
      db.transaction(() => {
        const at = clock.now();
        person = insertPerson(db, p, at);
        appendAudit(db, {
          at,
          actor,
          action: 'create',
          entity: 'person',
          entityId: String(person.id),
          before: undefined,
          after: p,
        });
      })();
      return person as Person;
    },

    recordCheck(input) {
      const prepared = prepareCheck(input, '', { createPerformer: false });
      let checkId = 0;
      db.transaction(() => {
        checkId = writeCheck(prepared, 'record');
      })();
      const rec = getCheck(db, checkId);
      if (!rec) throw new LabError('internal', 'check not found after writing it');
      return rec;
    },

    getCheck(checkId) {
      const id = Number(checkId);
      if (!Number.isInteger(id) || id < 1)
        throw LabError.field('checkId', checkId, 'a check number such as 12');
      const rec = getCheck(db, id);
      if (!rec) throw new LabError('not-found', `no check ${id} in this lab`);
      return rec;
    },

    evaluateBudget(input) {
      const doc = parseWith(BudgetDocumentSchema, input);
      const settings = lab();
      const issues = new Issues();
      const meter = getMeterByAsset(db, doc.meter);
      if (!meter)
        issues.add(
          'meter',
          doc.meter,
          'the asset id of a meter in this lab',
          `meter: no meter ${describe(doc.meter)} in this lab`,
        );
      const std = getStandardByAsset(db, doc.standard);
      if (!std)
        issues.add(
          'standard',
          doc.standard,
          'the asset id of a lab standard',
          `standard: no lab standard ${describe(doc.standard)} in this lab`,
        );
      issues.throwIfAny();
      const m = (meter as MeterRecord).meter;
      const cert =
        certificateOn(std as StandardRecord, clock.today()) ?? (std as StandardRecord).certificates[0];
      if (!cert) throw LabError.field('standard', doc.standard, 'a standard with a certificate');
      if (doc.sweep !== undefined) {
        // A swept point: the resonance fitted to the trace is the reference, judged as recorded.
        const swept = prepareSweepPoint({
          issues,
          field: 'point',
          point: { phase: 'as-found', dialSetting: doc.dialSetting, sweep: doc.sweep },
          method: 'sweep',
          meter: m,
          conditions: conditionsOf(doc, settings),
          standards: [{ record: std as StandardRecord, certificate: cert }],
          listedStandards: [doc.standard],
          rule: doc.decisionRule ?? settings.decisionRule,
          readingValue,
        });
        issues.throwIfAny();
        if (!swept) throw new LabError('internal', 'a swept point was neither judged nor refused');
        return swept.result;
      }
      const referenceHz = frequencyOrIssue(issues, doc.reference ?? '', 'reference');
      if (referenceHz !== undefined) {
        const out = checkInBand(referenceHz, m.minHz, m.maxHz, 'reference');
        if (out)
          issues.fromParse('reference', doc.reference, out, `a frequency inside the band of ${m.assetId}`);
      }
      const readings: Reading[] = [];
      (doc.readings ?? []).forEach((r, j) => {
        const v = readingValue(issues, m, r.value, `readings[${j}].value`);
        if (v !== undefined) readings.push({ value: v, direction: r.direction });
      });
      issues.throwIfAny();
      const result = evaluateOrIssue(
        issues,
        'readings',
        m,
        conditionsOf(doc, settings),
        referenceHz as number,
        cert,
        readings,
        doc.decisionRule ?? settings.decisionRule,
      );
      issues.throwIfAny();
      return result as PointResult;
    },

    airRefractivity(input) {
      const a = parseWith(AirSchema, input);
      const n = refractivityN(a.temperatureC, a.pressureHpa, a.humidityPct);
      // Reference air of a meter's graduation unless a meter says otherwise (common practice).
      const referenceN = refractivityN(20, 1013.25, 50);
      const result: AirResult = {
        refractivityN: n,
        refractiveIndex: 1 + n * 1e-6,
        waterVapourHpa: waterVapourPressureHpa(a.temperatureC, a.pressureHpa, a.humidityPct),
        shiftPpm: ((1 + referenceN * 1e-6) / (1 + n * 1e-6) - 1) * 1e6,
        referenceN,
      };
      return result;
    },

    importCsv(csvText) {
      if (typeof csvText !== 'string') throw LabError.field('csv', csvText, 'the text of a CSV file');
      const docs = csvToDocuments(csvText);
      const result: ImportResult = {
        metersSeen: new Set(docs.map((d) => d.doc.meter)).size,
        checksImported: 0,
        pointsImported: 0,
      };
      const lookups: ImportLookups = { meters: new Map(), standards: new Map() };
      const count = (p: PreparedCheck) => {
        result.checksImported += 1;
        result.pointsImported += p.points.length;
      };
      // Each check is validated and written in turn inside the one transaction, so only one
      // computed check is held at a time; a refusal anywhere rolls the whole import back, and
      // nothing an earlier check writes (its rows, a new performer) changes how a later one is
      // judged, so every stored result is the one validating all before writing gave.
      const inOwnTransaction = () => {
        db.transaction(() => {
          for (const d of docs) {
            const p = prepareCheckAtLine(d, lookups);
            writeCheck(p, 'import', lookups.settings);
            count(p);
          }
        })();
        return result;
      };
      if (docs.length < (options.writerThreadMinChecks ?? WRITER_THREAD_MIN_CHECKS))
        return inOwnTransaction();
      // A large import is written by a thread of its own while this one prepares the next check
      // (import-writer.ts): the same rows, in the same order, in one transaction.
      return importWriterFor(db).then(async (writer) => {
        if (!writer) return inOwnTransaction();
        writer.begin();
        try {
          for (const d of docs) {
            const p = prepareCheckAtLine(d, lookups);
            writer.write(checkWriteOf(p, 'import', lookups.settings));
            count(p);
          }
        } catch (e) {
          // The refusal is the answer; a writer that cannot even roll back has lost its
          // transaction with its connection anyway.
          await writer.rollback().catch(() => undefined);
          throw e;
        }
        await writer.commit();
        return result;
      });
    },

    exportCsv() {
      const rows: (string | number)[][] = [CSV_COLUMNS.slice()];
      for (const id of allCheckIds(db)) {
        const c = getCheck(db, id);
        if (!c) continue;
        const meter = meterOr404(c.meterAssetId).meter;
        for (const p of c.points) {
          p.readings.forEach((r) => {
            rows.push([
              c.meterAssetId,
              c.date,
              c.performer,
              c.standards.join(';'),
              c.method,
              c.conditions.temperatureC,
              c.conditions.temperatureUncertaintyC,
              c.conditions.pressureHpa,
              c.conditions.pressureUncertaintyHpa,
              c.conditions.humidityPct,
              c.conditions.humidityUncertaintyPct,
              c.adjusted ? 'yes' : 'no',
              p.seq,
              p.phase,
              p.referenceHz,
              p.standardAssetId,
              r.value,
              meter.dialKind === 'direct' ? 'Hz' : 'div',
              r.direction,
              p.dipDepthDb ?? '',
              c.remarks,
            ]);
          });
        }
      }
      return stringifyCsv(rows, { record_delimiter: '\r\n' });
    },
  };

  /** A check rebuilt from CSV rows, with the line numbers it came from for messages. */
  function prepareCheckAtLine(d: { doc: unknown; lines: string }, lookups: ImportLookups): PreparedCheck {
    try {
      return prepareCheck(d.doc, '', { createPerformer: true, lookups });
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

  // Each later group of operations lives in its own file and is added here.
  const api: SyncLabApi = {
    ...core,
    ...draftsOps(ctx),
    ...recordsOps(ctx),
    ...historyOps(ctx),
    ...sweepOps(ctx),
    ...documentsOps(ctx),
    ...dccOps(ctx),
  };
  return asyncApi(api);
}

/** The service is written synchronously (better-sqlite3 is synchronous); callers get the
 * async contract, and a refusal always arrives as a rejected promise, never a throw. */
type SyncLabApi = SyncOps<LabApi>;

function asyncApi(sync: SyncLabApi): LabApi {
  const out: Record<string, (...args: unknown[]) => Promise<unknown>> = {};
  // A write that another thread is still finishing (a bulk import's writer) holds back the
  // writes asked for after it, so they happen in the order they were asked for and none waits on
  // the file's lock while blocking the thread that must finish the first; reads go on meanwhile
  // and see the file as it was before it.
  let tail: Promise<unknown> | undefined;
  const holdWritesUntil = (p: Promise<unknown>) => {
    const settled = p.then(
      () => undefined,
      () => undefined,
    );
    tail = settled;
    void settled.then(() => {
      if (tail === settled) tail = undefined;
    });
  };
  for (const op of Object.keys(OPERATIONS) as OperationName[]) {
    const fn = sync[op] as (...args: unknown[]) => unknown;
    /** The answer, and whether work on it goes on after this call returned. */
    const call = (args: unknown[]): { answer: Promise<unknown>; ongoing: boolean } => {
      try {
        const value = fn(...args);
        return value instanceof Promise
          ? { answer: value, ongoing: true }
          : { answer: Promise.resolve(value), ongoing: false };
      } catch (e) {
        return { answer: Promise.reject(e instanceof Error ? e : new Error(String(e))), ongoing: false };
      }
    };
    out[op] =
      OPERATIONS[op] === 'write'
        ? (...args: unknown[]) => {
            if (!tail) {
              const { answer, ongoing } = call(args);
              if (ongoing) holdWritesUntil(answer);
              return answer;
            }
            const answer = tail.then(() => call(args).answer);
            holdWritesUntil(answer);
            return answer;
          }
        : (...args: unknown[]) => call(args).answer;
  }
  return out as unknown as LabApi;
}

/** Below this many checks an import is written in the service's own transaction: starting the
 * writer thread (loading its code) costs more than it saves on a few hundred milliseconds. */
export const WRITER_THREAD_MIN_CHECKS = 100;

/** The history CSV: its columns and its rows as check documents (app/api/import-csv.ts). */
export { CSV_COLUMNS, csvToDocuments };
