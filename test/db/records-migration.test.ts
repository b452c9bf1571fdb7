// Migration 0002 (records) on a file written at schema 1: the lab row gains the strict
// traceability policy and "reviewer must differ", rows already there are kept as they were,
// and the stronger revision lock applies from then on.
import { describe, expect, it } from 'vitest';
import { getLab } from '../../db/queries/lab';
import { migrate, openLabDb, schemaVersion } from '../../db/store';

describe('migration 0002_records', () => {
  it('keeps existing rows and gives the lab the safe defaults', () => {
    const db = openLabDb(':memory:', { targetVersion: 1 });
    expect(schemaVersion(db)).toBe(1);
    db.prepare(
      `INSERT INTO lab (id, name, decision_rule_json, reliability_target, interval_min_months, interval_max_months,
         default_u_temperature_c, default_u_pressure_hpa, default_u_humidity_pct)
       VALUES (1, 'Bench lab', '{"kind":"simple"}', 0.95, 6, 60, 0.3, 1, 5)`,
    ).run();
    db.prepare("INSERT INTO person (name, role, created_at) VALUES ('Ada Fenwick', 'technician', 't')").run();
    const peopleBefore = db.prepare('SELECT * FROM person').all();

    migrate(db, 2);
    expect(schemaVersion(db)).toBe(2);
    expect(db.prepare('SELECT * FROM person').all()).toEqual(peopleBefore);
    expect(getLab(db)).toMatchObject({
      name: 'Bench lab',
      decisionRule: { kind: 'simple' },
      signersMustDiffer: true,
      traceabilityPolicy: 'strict',
    });
    const columns = (db.prepare('PRAGMA table_info(check_revision)').all() as { name: string }[]).map(
      (c) => c.name,
    );
    expect(columns).toEqual(expect.arrayContaining(['amended_by', 'traceability_exceptions_json']));
    // A revision can no longer be written already signed, nor signed without a signature.
    db.prepare(
      "INSERT INTO meter (asset_id, construction, min_hz, max_hz, dial_kind, accuracy_rel_ppm, resolution, alpha_per_k, u_alpha_per_k, ref_temperature_c, ref_pressure_hpa, ref_humidity_pct, loaded_q, setting_fraction, min_dip_db, max_input_power_w, state, interval_months, created_at) VALUES ('M', 'coaxial', 1e9, 2e9, 'direct', 1000, 1e6, 0, 0, 20, 1013, 50, 1000, 0.1, 1, 1, 'in-service', 12, 't')",
    ).run();
    db.prepare("INSERT INTO check_event (meter_id, created_at) VALUES (1, 't')").run();
    const revision = (state: string) =>
      db
        .prepare(
          `INSERT INTO check_revision (check_id, revision, state, performed_on, performer_id, method, temperature_c,
             u_temperature_c, pressure_hpa, u_pressure_hpa, humidity_pct, u_humidity_pct, adjusted,
             decision_rule_json, engine_version, recorded_at)
           VALUES (1, 1, ?, '2026-01-01', 1, 'tune-to-dip', 20, 0.3, 1013, 1, 50, 5, 0, '{}', 'e', 't')`,
        )
        .run(state);
    expect(() => revision('signed')).toThrow(/written as a draft/);
    revision('draft');
    expect(() => db.prepare("UPDATE check_revision SET state = 'signed'").run()).toThrow(
      /only with a signature/,
    );
    db.close();
  });
});
