// Lab identity and settings: one row.
import type { LabSettings } from '../../app/model/records';
import type { DecisionRule } from '../../app/engine/model';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

interface LabRow {
  name: string;
  address: string;
  accreditation: string;
  decision_rule_json: string;
  reliability_target: number;
  interval_min_months: number;
  interval_max_months: number;
  default_u_temperature_c: number;
  default_u_pressure_hpa: number;
  default_u_humidity_pct: number;
  print_suggested_interval: number;
  signers_must_differ: number;
  traceability_policy: LabSettings['traceabilityPolicy'];
}

function rowToLab(r: LabRow): LabSettings {
  return {
    name: r.name,
    address: r.address,
    accreditation: r.accreditation,
    decisionRule: JSON.parse(r.decision_rule_json) as DecisionRule,
    reliabilityTarget: r.reliability_target,
    intervalMinMonths: r.interval_min_months,
    intervalMaxMonths: r.interval_max_months,
    defaultTemperatureUncertaintyC: r.default_u_temperature_c,
    defaultPressureUncertaintyHpa: r.default_u_pressure_hpa,
    defaultHumidityUncertaintyPct: r.default_u_humidity_pct,
    printSuggestedInterval: r.print_suggested_interval === 1,
    signersMustDiffer: r.signers_must_differ === 1,
    traceabilityPolicy: r.traceability_policy,
  };
}

function labToRow(s: LabSettings): LabRow {
  return {
    name: s.name,
    address: s.address,
    accreditation: s.accreditation,
    decision_rule_json: JSON.stringify(s.decisionRule),
    reliability_target: s.reliabilityTarget,
    interval_min_months: s.intervalMinMonths,
    interval_max_months: s.intervalMaxMonths,
    default_u_temperature_c: s.defaultTemperatureUncertaintyC,
    default_u_pressure_hpa: s.defaultPressureUncertaintyHpa,
    default_u_humidity_pct: s.defaultHumidityUncertaintyPct,
    print_suggested_interval: s.printSuggestedInterval ? 1 : 0,
    signers_must_differ: s.signersMustDiffer ? 1 : 0,
    traceability_policy: s.traceabilityPolicy,
  };
}

export function getLab(db: LabDb): LabSettings | undefined {
  const row = cachedStatement(db, 'SELECT * FROM lab WHERE id = 1').get() as LabRow | undefined;
  return row && rowToLab(row);
}

export function putLab(db: LabDb, settings: LabSettings): void {
  const row = labToRow(settings);
  const info = db
    .prepare(
      `INSERT INTO lab (id, name, address, accreditation, decision_rule_json, reliability_target,
         interval_min_months, interval_max_months, default_u_temperature_c, default_u_pressure_hpa,
         default_u_humidity_pct, print_suggested_interval, signers_must_differ, traceability_policy)
       VALUES (1, @name, @address, @accreditation, @decision_rule_json, @reliability_target,
         @interval_min_months, @interval_max_months, @default_u_temperature_c, @default_u_pressure_hpa,
         @default_u_humidity_pct, @print_suggested_interval, @signers_must_differ, @traceability_policy)
       ON CONFLICT (id) DO UPDATE SET name = excluded.name, address = excluded.address,
         accreditation = excluded.accreditation, decision_rule_json = excluded.decision_rule_json,
         reliability_target = excluded.reliability_target, interval_min_months = excluded.interval_min_months,
         interval_max_months = excluded.interval_max_months, default_u_temperature_c = excluded.default_u_temperature_c,
         default_u_pressure_hpa = excluded.default_u_pressure_hpa, default_u_humidity_pct = excluded.default_u_humidity_pct,
         print_suggested_interval = excluded.print_suggested_interval,
         signers_must_differ = excluded.signers_must_differ, traceability_policy = excluded.traceability_policy`,
    )
    .run(row);
  if (info.changes !== 1) throw new Error(`lab settings: expected 1 row written, got ${info.changes}`);
}
