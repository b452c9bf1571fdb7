// Edits made to a lab file outside the program, as an intruder holding the file would make them:
// the guard triggers dropped first and put back word for word afterwards (so only the edit
// remains), then one value changed, one row deleted or one row inserted, table by table. Each
// edit must be named by `integrity`, or change nothing a user sees (derived tables). The figures
// (edits tried, found, harmless) are printed at the end. Method: common practice for tamper
// evidence (every change found by comparing with commitments made when the program wrote it).
import { copyFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import type { IntegrityReport } from '../../app/api/contract-records';
import { openApi } from '../../app/api/open';
import { clock, goodCheck, seededLab } from '../fixtures/lab';

const ADA = { name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' };
const BO = { name: 'Bo Marsh', passphrase: 'bo-passphrase-22' };

const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-tamper-'));
const template = path.join(dir, 'template.dipledger');
let baselineView = '';
let copies = 0;
const figures = { tried: 0, found: 0, harmless: 0 };

/** What a user sees: every read the app shows records through. */
async function userView(api: LabApi): Promise<string> {
  const meters = await api.listMeters();
  const checks: unknown[] = [];
  for (const id of [1, 2, 3])
    for (const revision of [1, 2])
      checks.push(await api.getCheckRevision({ checkId: id, revision }).catch(() => null));
  return JSON.stringify([
    await api.getLab(),
    await api.listPeople(),
    await api.listSigners(),
    meters,
    await Promise.all(meters.map((m) => api.getMeter(m.assetId))),
    await api.listStandards(),
    await api.listDue({ withinDays: 3650 }),
    await api.listRegister(),
    checks,
    await api.listDocuments(),
    await api.listDrafts(),
    await api.exportCsv(),
    await api.getTrend('TW-01'),
  ]);
}

beforeAll(async () => {
  const lab = await seededLab(template);
  const { api } = lab;
  await api.enrolSigner(ADA);
  await api.enrolSigner(BO);
  // Check 1: signed by performer and reviewer, with a certificate issued from it.
  const one = await api.recordCheck(goodCheck());
  await api.signCheck({ checkId: one.checkId, person: ADA.name, passphrase: ADA.passphrase });
  await api.signCheck({ checkId: one.checkId, person: BO.name, passphrase: BO.passphrase });
  await api.issueCertificate({ checkId: one.checkId });
  // Check 2: by the sweep method, signed by its performer.
  const typed = Array.from({ length: 41 }, (_, k) => {
    const f = 10.004e9 - 10e6 + k * 0.5e6;
    const u = (2 * 2000 * (f - 10.004e9)) / 10.004e9;
    return { frequency: `${(f / 1e6).toFixed(1)} MHz`, level: -1.2 * (1 - 0.37 / (1 + u * u)) };
  });
  const two = await api.recordCheck({
    ...goodCheck({ date: '2026-11-24' }),
    method: 'sweep',
    points: [{ dialSetting: '10 GHz', sweep: { points: typed, level: 'volts', detectorSign: -1 } }],
  } as never);
  await api.signCheck({ checkId: two.checkId, person: ADA.name, passphrase: ADA.passphrase });
  // Check 3: a draft revision, not signed.
  await api.recordCheck(goodCheck({ date: '2026-11-26' }));
  await api.changeMeterState({ assetId: 'TW-02', state: 'quarantined', reason: 'dial slips under load' });
  await api.saveDraft({ document: { format: 'dipledger.check/1', meter: 'TW-02' } });
  // A later document, so the newest trail entries are anchored outside the file.
  await api.issueSheet({ checkId: one.checkId });
  const report = await api.verifyIntegrity();
  expect(report.problems).toEqual([]);
  expect(report.anchorsChecked).toBe(2);
  baselineView = await userView(api);
  lab.close();
});

afterAll(() => {
  console.log(
    `tamper suite: ${figures.tried} edits tried, ${figures.found} named by integrity, ${figures.harmless} changed nothing a user sees`,
  );
});

type Outcome = { report: IntegrityReport; view: string };

/** Copies the template, makes the edit with the guard triggers out of the way (put back unless
 * `keepTriggersDropped`), then opens the file as the program does and runs integrity. */
async function tamper(
  sql: string,
  options: { keepTriggersDropped?: string[]; view?: boolean } = {},
): Promise<Outcome> {
  const file = path.join(dir, `edit-${++copies}.dipledger`);
  copyFileSync(template, file);
  const raw = new Database(file);
  raw.pragma('foreign_keys = OFF');
  const triggers = raw.prepare("SELECT name, sql FROM sqlite_master WHERE type = 'trigger'").all() as {
    name: string;
    sql: string;
  }[];
  for (const t of triggers) raw.exec(`DROP TRIGGER ${t.name}`);
  raw.exec(sql);
  for (const t of triggers) if (!options.keepTriggersDropped?.includes(t.name)) raw.exec(t.sql);
  raw.close();
  const lab = openApi(file, { clock });
  try {
    const report = await lab.api.verifyIntegrity();
    return { report, view: options.view ? await userView(lab.api) : '' };
  } finally {
    lab.close();
  }
}

/** The edit must be named (a problem whose text matches `names`). */
async function expectFound(sql: string, names: RegExp, options: { keepTriggersDropped?: string[] } = {}) {
  figures.tried += 1;
  const { report } = await tamper(sql, options);
  const text = report.problems.map((p) => p.problem).join('\n');
  expect(report.ok, sql).toBe(false);
  expect(text, sql).toMatch(names);
  figures.found += 1;
}

/** The edit must be named, or leave everything a user sees as it was. */
async function expectFoundOrHarmless(sql: string) {
  figures.tried += 1;
  const { report, view } = await tamper(sql, { view: true });
  if (report.ok) {
    expect(view, sql).toBe(baselineView);
    figures.harmless += 1;
  } else figures.found += 1;
}

const newest = (n: number) => `DELETE FROM audit_entry WHERE id > (SELECT max(id) - ${n} FROM audit_entry)`;

describe('the cases found adversarially', () => {
  it("finds a reviewer's signature deleted", async () => {
    await expectFound(
      "DELETE FROM check_signature WHERE meaning = 'reviewed'",
      /check 1 was changed outside/,
    );
  });
  it('finds a signed check returned to draft and then changed', async () => {
    await expectFound(
      "UPDATE check_revision SET state = 'draft', temperature_c = 25 WHERE check_id = 1",
      /check 1 was changed outside/,
    );
  });
  it('finds a signed check deleted entirely while the trail shows it signed', async () => {
    await expectFound(
      `DELETE FROM reading WHERE point_id IN (SELECT p.id FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE r.check_id = 2);
       DELETE FROM sweep WHERE point_id IN (SELECT p.id FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE r.check_id = 2);
       DELETE FROM check_point WHERE revision_id IN (SELECT id FROM check_revision WHERE check_id = 2);
       DELETE FROM check_signature WHERE revision_id IN (SELECT id FROM check_revision WHERE check_id = 2);
       DELETE FROM check_revision_standard WHERE revision_id IN (SELECT id FROM check_revision WHERE check_id = 2);
       DELETE FROM check_revision WHERE check_id = 2; DELETE FROM check_event WHERE id = 2;`,
      /check 2 was deleted outside/,
    );
  });
  for (const col of ['verdict', 'error_ppm', 'error_hz', 'tolerance_hz', 'expanded_hz'])
    it(`finds the stored ${col} of a signed point changed`, async () => {
      const value = col === 'verdict' ? "'fail'" : `${col} * 3`;
      await expectFound(
        `UPDATE check_point SET ${col} = ${value} WHERE id = 1`,
        /check 1 was changed outside/,
      );
    });
  it('finds the stored verdicts and % of tolerance of a signed revision changed', async () => {
    await expectFound(
      "UPDATE check_revision SET as_found_verdict = 'pass', worst_used_fraction = 0.1 WHERE check_id = 1",
      /check 1 was changed outside/,
    );
  });
  it('finds a quarantined meter returned to service', async () => {
    await expectFound(
      "UPDATE meter SET state = 'in-service' WHERE asset_id = 'TW-02'",
      /meter TW-02 was changed/,
    );
  });
  it("finds a meter's stated accuracy loosened 100 times", async () => {
    await expectFound(
      "UPDATE meter SET accuracy_rel_ppm = accuracy_rel_ppm * 100 WHERE asset_id = 'TW-01'",
      /meter TW-01 was changed/,
    );
  });
  it('finds the rule that signers must differ turned off', async () => {
    await expectFound('UPDATE lab SET signers_must_differ = 0', /the lab settings was changed/);
  });
  it('finds a key reassigned to another person', async () => {
    await expectFound('UPDATE person_key SET person_id = 2 WHERE id = 1', /signing key 1 was changed/);
  });
  it("finds an issued document's stored PDF replaced", async () => {
    await expectFound(
      "UPDATE issued_document SET pdf = CAST(replace(CAST(pdf AS TEXT), 'Test', 'Best') AS BLOB) WHERE id = 1",
      /issued document C-2026-0001 revision 1 was changed/,
    );
  });
  it('finds a guard trigger dropped', async () => {
    await expectFound('SELECT 1', /trigger check_signature_no_delete is missing/, {
      keepTriggersDropped: ['check_signature_no_delete'],
    });
  });
  it('finds the newest audit entry removed', async () => {
    await expectFound(newest(1), /issued document .* no audit entry records it/);
  });
  it('finds the newest entries removed back past the head a later document carries', async () => {
    await expectFound(newest(4), /carries audit head .* no longer in the chain/);
  });
});

// One change, one deletion and one insertion per table (a lab table has one row: its insertion
// is a second row, refused by its CHECK, so a replacement row stands for it).
const NAMED = /outside the program|no longer|does not follow|refer to a missing|belong/;

const PER_TABLE: Record<string, [string, string, string]> = {
  lab: [
    "UPDATE lab SET name = 'Other lab'",
    'DELETE FROM lab',
    'DELETE FROM lab; INSERT INTO lab (id, name, decision_rule_json, reliability_target, interval_min_months, interval_max_months, default_u_temperature_c, default_u_pressure_hpa, default_u_humidity_pct) VALUES (1, \'Forged\', \'{"kind":"simple"}\', 0.95, 1, 60, 0.5, 1, 5)',
  ],
  person: [
    "UPDATE person SET role = 'reviewer' WHERE id = 1",
    'DELETE FROM person WHERE id = 2',
    "INSERT INTO person (name, role, created_at) VALUES ('Ivo Nest', 'administrator', '2026-01-01')",
  ],
  person_key: [
    "UPDATE person_key SET created_at = '2020-01-01' WHERE id = 2",
    'DELETE FROM person_key WHERE id = 2',
    `INSERT INTO person_key (person_id, public_key_pem, fingerprint, kdf, kdf_n, kdf_r, kdf_p, salt_b64, iv_b64, tag_b64, encrypted_private_key_b64, created_at)
     SELECT person_id, public_key_pem, fingerprint || 'x', kdf, kdf_n, kdf_r, kdf_p, salt_b64, iv_b64, tag_b64, encrypted_private_key_b64, created_at FROM person_key WHERE id = 1`,
  ],
  meter: [
    "UPDATE meter SET interval_months = 60 WHERE asset_id = 'TW-01'",
    "DELETE FROM meter_chart_point WHERE meter_id = 2; DELETE FROM meter WHERE asset_id = 'TW-02'",
    `INSERT INTO meter (asset_id, construction, min_hz, max_hz, dial_kind, accuracy_rel_ppm, resolution, alpha_per_k, u_alpha_per_k, ref_temperature_c, ref_pressure_hpa, ref_humidity_pct, loaded_q, setting_fraction, min_dip_db, max_input_power_w, state, interval_months, created_at)
     SELECT 'TW-99', construction, min_hz, max_hz, dial_kind, accuracy_rel_ppm, resolution, alpha_per_k, u_alpha_per_k, ref_temperature_c, ref_pressure_hpa, ref_humidity_pct, loaded_q, setting_fraction, min_dip_db, max_input_power_w, state, interval_months, created_at FROM meter WHERE id = 1`,
  ],
  meter_chart_point: [
    'UPDATE meter_chart_point SET frequency_hz = frequency_hz + 1e6 WHERE divisions = 5',
    'DELETE FROM meter_chart_point WHERE divisions = 10',
    'INSERT INTO meter_chart_point (meter_id, divisions, frequency_hz) VALUES (2, 7, 3.2e9)',
  ],
  meter_plan_point: [
    'UPDATE meter_plan_point SET frequency_hz = 9e9 WHERE frequency_hz = 8.5e9',
    'DELETE FROM meter_plan_point WHERE frequency_hz = 12e9',
    'INSERT INTO meter_plan_point (meter_id, frequency_hz) VALUES (1, 11e9)',
  ],
  standard: [
    "UPDATE standard SET description = 'Something else'",
    'DELETE FROM standard_certificate; DELETE FROM standard',
    "INSERT INTO standard (asset_id, description, created_at) VALUES ('SRC-Z', 'forged', '2026-01-01')",
  ],
  standard_certificate: [
    'UPDATE standard_certificate SET expanded_ppm = 0.0001 WHERE id = 2',
    'DELETE FROM standard_certificate WHERE id = 1',
    "INSERT INTO standard_certificate (standard_id, certificate_id, issued_by, calibrated_on, due_on, expanded_ppm, coverage_k) VALUES (1, 'C-X', 'nobody', '2026-01-01', '2030-01-01', 0.001, 2)",
  ],
  check_event: [
    'UPDATE check_event SET meter_id = 2 WHERE id = 3',
    `DELETE FROM reading WHERE point_id IN (SELECT p.id FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE r.check_id = 3);
     DELETE FROM check_point WHERE revision_id IN (SELECT id FROM check_revision WHERE check_id = 3);
     DELETE FROM check_revision_standard WHERE revision_id IN (SELECT id FROM check_revision WHERE check_id = 3);
     DELETE FROM check_revision WHERE check_id = 3; DELETE FROM check_event WHERE id = 3`,
    "INSERT INTO check_event (meter_id, created_at) VALUES (1, '2026-11-30')",
  ],
  check_revision: [
    "UPDATE check_revision SET performed_on = '2026-11-21' WHERE check_id = 1",
    'DELETE FROM check_revision WHERE check_id = 3',
    `INSERT INTO check_revision SELECT NULL, check_id, 2, 'signed', performed_on, performer_id, method, temperature_c, u_temperature_c, pressure_hpa, u_pressure_hpa, humidity_pct, u_humidity_pct, adjusted, 'forged', amend_reason, decision_rule_json, engine_version, as_found_verdict, as_left_verdict, worst_used_fraction, recorded_at, amended_by, traceability_exceptions_json FROM check_revision WHERE check_id = 1`,
  ],
  check_revision_standard: [
    'UPDATE check_revision_standard SET certificate_id = 1 WHERE revision_id = 1',
    'DELETE FROM check_revision_standard WHERE revision_id = 1',
    'INSERT INTO check_revision_standard (revision_id, standard_id, certificate_id) VALUES (3, 2, 1)',
  ],
  check_point: [
    'UPDATE check_point SET dip_depth_db = 9 WHERE id = 1',
    'DELETE FROM reading WHERE point_id = 1; DELETE FROM check_point WHERE id = 1',
    'INSERT INTO check_point (revision_id, seq, phase, reference_hz, standard_id, dip_depth_db, error_hz, error_ppm, expanded_hz, coverage_k, tolerance_hz, verdict, result_json) SELECT revision_id, seq + 10, phase, reference_hz, standard_id, dip_depth_db, error_hz, error_ppm, expanded_hz, coverage_k, tolerance_hz, verdict, result_json FROM check_point WHERE id = 1',
  ],
  reading: [
    'UPDATE reading SET value = value + 1e6 WHERE point_id = 1 AND seq = 1',
    'DELETE FROM reading WHERE point_id = 1 AND seq = 4',
    "INSERT INTO reading (point_id, seq, value, direction) VALUES (1, 5, 10.004e9, 'up')",
  ],
  sweep: [
    'UPDATE sweep SET f0_hz = f0_hz + 1e5',
    'DELETE FROM sweep',
    'INSERT INTO sweep SELECT 1, dial_setting, source_name, source_kind, level_kind, point_count, trace, complex, method, f0_hz, u_f0_hz, loaded_q, u_loaded_q, depth_db, spurious_count, fit_json FROM sweep',
  ],
  check_signature: [
    "UPDATE check_signature SET printed_name = 'Someone Else' WHERE seq = 1 AND revision_id = 1",
    'DELETE FROM check_signature WHERE revision_id = 2',
    `INSERT INTO check_signature (revision_id, seq, person_id, key_id, printed_name, role, meaning, signed_at, payload_sha256, signature_b64)
     SELECT 2, 2, person_id, key_id, printed_name, role, 'reviewed', signed_at, payload_sha256, signature_b64 FROM check_signature WHERE revision_id = 1 AND seq = 2`,
  ],
  issued_document: [
    "UPDATE issued_document SET issued_by = 'someone' WHERE id = 1",
    'DELETE FROM issued_document_signature WHERE document_id = 2; DELETE FROM issued_document WHERE id = 2',
    `INSERT INTO issued_document (kind, number, revision, check_revision_id, issued_at, issued_by, sha256, record_sha256, record_name, byte_length, pades, interval_printed, pdf)
     SELECT kind, number, 9, check_revision_id, issued_at, issued_by, substr(sha256, 2) || 'f', record_sha256, record_name, byte_length, pades, interval_printed, pdf FROM issued_document WHERE id = 1`,
  ],
  issued_document_signature: [
    'UPDATE issued_document_signature SET signature_id = 3 WHERE document_id = 1 AND signature_id = 2',
    'DELETE FROM issued_document_signature WHERE document_id = 1 AND signature_id = 2',
    'INSERT INTO issued_document_signature (document_id, signature_id) VALUES (1, 3)',
  ],
  check_draft: [
    `UPDATE check_draft SET document_json = '{"format":"dipledger.check/1","meter":"TW-01"}'`,
    'DELETE FROM check_draft',
    `INSERT INTO check_draft (meter_asset_id, document_json, created_at, updated_at) VALUES ('TW-01', '{"format":"dipledger.check/1"}', '2026-01-01', '2026-01-01')`,
  ],
  audit_entry: [
    "UPDATE audit_entry SET actor = 'someone' WHERE id = 5",
    'DELETE FROM audit_entry WHERE id = 5',
    `INSERT INTO audit_entry (at, actor, action, entity, entity_id, before_json, after_json, prev_hash, hash, state_sha256)
     SELECT at, actor, action, entity, entity_id, before_json, after_json, hash, substr(hash, 2) || '0', state_sha256 FROM audit_entry WHERE id = (SELECT max(id) FROM audit_entry)`,
  ],
};

// Derived tables: a change must be named or leave everything a user sees as it was.
const DERIVED: Record<string, [string, string, string]> = {
  meter_generation: [
    'UPDATE meter_generation SET generation = generation + 5',
    'DELETE FROM meter_generation WHERE meter_id = 1',
    'DELETE FROM meter_generation WHERE meter_id = 2; INSERT INTO meter_generation (meter_id, generation) VALUES (2, 77)',
  ],
  meter_summary: [
    `UPDATE meter_summary SET summary_json = '{"epoch":null,"words":[{"short":"OUT OF TOLERANCE"}]}' WHERE kind = 'flags'`,
    'DELETE FROM meter_summary',
    `INSERT OR REPLACE INTO meter_summary (meter_id, kind, generation, made_by, summary_json) SELECT meter_id, 'attributes', generation, made_by, '[{"interval":1,"inTolerance":false}]' FROM meter_summary WHERE kind = 'flags'`,
  ],
  schema_migration: [
    "UPDATE schema_migration SET applied_at = '2001-01-01'",
    'DELETE FROM schema_migration WHERE version = 3',
    "INSERT INTO schema_migration (version, name, applied_at) VALUES (99, 'forged', '2001-01-01')",
  ],
};

describe('every table: a value changed, a row deleted, a row inserted', () => {
  for (const [table, [change, remove, insert]] of Object.entries(PER_TABLE)) {
    it(`finds a value of ${table} changed`, async () => {
      await expectFound(change, NAMED);
    });
    it(`finds a row of ${table} deleted`, async () => {
      await expectFound(remove, NAMED);
    });
    it(`finds a row of ${table} inserted`, async () => {
      await expectFound(insert, NAMED);
    });
  }
  for (const [table, edits] of Object.entries(DERIVED))
    for (const [i, sql] of edits.entries())
      it(`finds the derived table ${table} ${['changed', 'with a row deleted', 'with a row inserted'][i]}, or nothing shown changed`, async () => {
        await expectFoundOrHarmless(sql);
      });
});
