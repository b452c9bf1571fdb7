// Records that hold up in an audit, through the real API on a lab file: signing (performer,
// then reviewer), locking, amendments as revisions, the audit trail, traceability policy and
// the integrity check. Sources are named beside the tests they apply to.
import { createPrivateKey, createPublicKey } from 'node:crypto';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, describe, expect, it } from 'vitest';
import type { OpenedLab } from '../../app/api/open';
import {
  canonicalBytes,
  generateSealedKey,
  signBytes,
  unsealPrivateKey,
  verifyBytes,
} from '../../app/signing/keys';
import { diffValues } from '../../app/api/records-diff';
import { goodCheck, seededLab } from '../fixtures/lab';

export const ADA = { name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' };
export const BO = { name: 'Bo Marsh', passphrase: 'bo-passphrase-22' };

const tmp = () => mkdtempSync(path.join(tmpdir(), 'dipledger-records-'));
const open: OpenedLab[] = [];
afterEach(() => {
  while (open.length) open.pop()?.close();
});

async function labWithSigners(file = ':memory:'): Promise<OpenedLab> {
  const lab = await seededLab(file);
  open.push(lab);
  await lab.api.enrolSigner(ADA);
  await lab.api.enrolSigner(BO);
  return lab;
}

async function countRows(lab: OpenedLab) {
  const audit = await lab.api.listAudit({ limit: 10000 });
  const signers = await lab.api.listSigners();
  return { audit: audit.length, signers: signers.length };
}

describe('Ed25519 from node:crypto and canonical JSON (RFC 8785)', () => {
  it('signs RFC 8032 section 7.1 TEST 1 (empty message) to the published signature', () => {
    // RFC 8032, 7.1 TEST 1: secret key, public key and signature as published.
    const secret = Buffer.from('9d61b19deffd5a60ba844af492ec2cc44449c5697b326919703bac031cae7f60', 'hex');
    const pub = Buffer.from('d75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a', 'hex');
    const expected =
      'e5564300c360ac729086e2cc806e828a84877f1eb8e5d974d873e065224901555fb8821590a33bacc61e39701cf9b46bd25bf5f0595bbe24655141438e7a100b';
    const jwk = { kty: 'OKP', crv: 'Ed25519', d: secret.toString('base64url'), x: pub.toString('base64url') };
    const privateKey = createPrivateKey({ key: jwk, format: 'jwk' });
    const sig = signBytes(privateKey, Buffer.alloc(0));
    expect(Buffer.from(sig, 'base64').toString('hex')).toBe(expected);
    const pem = createPublicKey({ key: { kty: 'OKP', crv: 'Ed25519', x: jwk.x }, format: 'jwk' })
      .export({ type: 'spki', format: 'pem' })
      .toString();
    expect(verifyBytes(pem, Buffer.alloc(0), sig)).toBe(true);
    expect(verifyBytes(pem, Buffer.from([0]), sig)).toBe(false);
  });

  it('writes the RFC 8785 section 3.2.2 sample in its canonical form', () => {
    // RFC 8785, 3.2.2 (sorting and number serialization example).
    const input = JSON.parse(
      '{"numbers": [333333333.33333329, 1E30, 4.50, 2e-3, 0.000000000000000000000000001],' +
        '"string": "\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/", "literals": [null, true, false]}',
    ) as unknown;
    expect(canonicalBytes(input).toString('utf8')).toBe(
      '{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],' +
        '"string":"\u20ac$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}',
    );
  });

  it('seals a private key so only its passphrase opens it (AES-256-GCM under scrypt)', () => {
    const sealed = generateSealedKey('correct horse battery', { n: 2 ** 14, r: 8, p: 1 });
    expect(unsealPrivateKey(sealed, 'correct horse batterY')).toBeUndefined();
    const key = unsealPrivateKey(sealed, 'correct horse battery');
    expect(key).toBeDefined();
    const sig = signBytes(key!, Buffer.from('x'));
    expect(verifyBytes(sealed.publicKeyPem, Buffer.from('x'), sig)).toBe(true);
    // The key material at rest is not the PKCS#8 key in clear.
    const der = key!.export({ type: 'pkcs8', format: 'der' });
    expect(Buffer.from(sealed.encryptedPrivateKeyB64, 'base64').equals(der)).toBe(false);
  });

  it('diffs records path by path', () => {
    expect(diffValues({ a: 1, p: [{ v: 1 }, { v: 2 }] }, { a: 1, p: [{ v: 1 }, { v: 3 }], b: 'x' })).toEqual([
      { path: 'p[1].v', before: 2, after: 3 },
      { path: 'b', before: undefined, after: 'x' },
    ]);
  });
});

describe('signing a check (21 CFR Part 11 11.50, 11.70, 11.200)', () => {
  it('records performer then reviewer with printed name, time and meaning, and locks the revision', async () => {
    const lab = await labWithSigners();
    const rec = await lab.api.recordCheck(goodCheck());
    expect(rec.state).toBe('draft');
    const one = await lab.api.signCheck({
      checkId: rec.checkId,
      person: ADA.name,
      passphrase: ADA.passphrase,
    });
    expect(one.record.state).toBe('signed');
    expect(one.awaiting).toBe('reviewed');
    // 11.50(a): printed name, date and time, meaning.
    expect(one.signatures).toEqual([
      expect.objectContaining({
        seq: 1,
        printedName: 'Ada Fenwick',
        meaning: 'performed',
        signedAt: '2026-12-01T09:30:00.000Z',
      }),
    ]);
    const two = await lab.api.signCheck({ checkId: rec.checkId, person: BO.name, passphrase: BO.passphrase });
    expect(two.signatures.map((s) => `${s.meaning}:${s.printedName}:${s.role}`)).toEqual([
      'performed:Ada Fenwick:technician',
      'reviewed:Bo Marsh:reviewer',
    ]);
    expect(two.effectiveRevision).toBe(1);
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
  });

  it('a wrong passphrase signs nothing and says so', async () => {
    const lab = await labWithSigners();
    const rec = await lab.api.recordCheck(goodCheck());
    const before = await countRows(lab);
    await expect(
      lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: 'not-adas-passphrase' }),
    ).rejects.toThrow(/passphrase does not open Ada Fenwick's signing key: nothing was signed/);
    const after = await lab.api.getCheckRevision({ checkId: rec.checkId });
    expect(after.signatures).toEqual([]);
    expect(after.record.state).toBe('draft');
    expect(await countRows(lab)).toEqual(before);
  });

  it('never repeats a passphrase in a refusal', async () => {
    const lab = await labWithSigners();
    const err = (await lab.api
      .enrolSigner({ name: 'Cy New', role: 'technician', passphrase: 'short-pw' })
      .catch((e: unknown) => e)) as Error & { issues: unknown[] };
    expect(err.message).toMatch(/passphrase: too short/);
    expect(JSON.stringify(err.issues)).not.toContain('short-pw');
  });

  it('takes the performer first, then a different reviewer when the lab requires it', async () => {
    const lab = await labWithSigners();
    const rec = await lab.api.recordCheck(goodCheck());
    await expect(
      lab.api.signCheck({ checkId: rec.checkId, person: BO.name, passphrase: BO.passphrase }),
    ).rejects.toThrow(/cannot sign "performed".*the performer named in the check/);
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    await expect(
      lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase }),
    ).rejects.toThrow(/cannot sign "reviewed".*a reviewer or administrator/);
    // An administrator who performed may not also review when signers must differ.
    await lab.api.enrolSigner({ name: 'Dee Admin', role: 'administrator', passphrase: 'dee-passphrase-333' });
    await lab.api.recordCheck(goodCheck({ performer: 'Dee Admin', date: '2026-11-21' }));
    const checkId = 2;
    await lab.api.signCheck({ checkId, person: 'Dee Admin', passphrase: 'dee-passphrase-333' });
    await expect(
      lab.api.signCheck({ checkId, person: 'Dee Admin', passphrase: 'dee-passphrase-333' }),
    ).rejects.toThrow(/already signed check 2 revision 1; the lab requires a different reviewer/);
    await lab.api.updateLab({ ...(await lab.api.getLab()), signersMustDiffer: false });
    const v = await lab.api.signCheck({ checkId, person: 'Dee Admin', passphrase: 'dee-passphrase-333' });
    expect(v.signatures.map((s) => s.meaning)).toEqual(['performed', 'reviewed']);
  });
});

describe('a signed check is locked', () => {
  it('cannot be changed through the API: recording it again is refused, amending makes a new revision', async () => {
    const lab = await labWithSigners();
    const rec = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    await expect(lab.api.recordCheck(goodCheck({ remarks: 'changed' }))).rejects.toThrow(/amend it instead/);
    const first = await lab.api.getCheckRevision({ checkId: rec.checkId, revision: 1 });
    expect(first.record.remarks).toBe('');
  });

  it('cannot be changed by SQL written straight into the file (triggers)', async () => {
    const file = path.join(tmp(), 'lab.dipledger');
    const lab = await labWithSigners(file);
    const rec = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    lab.close();
    open.pop();
    const db = new Database(file);
    expect(() => db.prepare("UPDATE check_revision SET remarks = 'edited'").run()).toThrow(/never changed/);
    expect(() => db.prepare("UPDATE check_revision SET state = 'draft'").run()).toThrow(/never changed/);
    expect(() => db.prepare('UPDATE check_revision SET performer_id = 2').run()).toThrow(/never changed/);
    expect(() => db.prepare('UPDATE reading SET value = value + 1').run()).toThrow(/never changed/);
    expect(() => db.prepare('UPDATE check_point SET verdict = ?').run('pass')).toThrow(/never changed/);
    expect(() => db.prepare('DELETE FROM check_revision_standard').run()).toThrow(/never deleted/);
    expect(() =>
      db
        .prepare(
          `INSERT INTO reading (point_id, seq, value, direction) SELECT id, 99, 1, 'up' FROM check_point LIMIT 1`,
        )
        .run(),
    ).toThrow(/never added/);
    expect(() => db.prepare("UPDATE check_signature SET printed_name = 'X'").run()).toThrow(/never changed/);
    expect(() => db.prepare('DELETE FROM check_signature').run()).toThrow(/never deleted/);
    expect(() => db.prepare("UPDATE person_key SET public_key_pem = 'x'").run()).toThrow(/never changed/);
    expect(() => db.prepare("UPDATE audit_entry SET actor = 'x'").run()).toThrow(/append-only/);
    expect(() => db.prepare('DELETE FROM audit_entry').run()).toThrow(/append-only/);
    db.close();
  });
});

describe('amendments (ISO/IEC 17025:2017 7.5.2)', () => {
  it('keep the old revision in full with the reason, who and when, and show what changed', async () => {
    const lab = await labWithSigners();
    const rec = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    await lab.api.signCheck({ checkId: rec.checkId, person: BO.name, passphrase: BO.passphrase });
    const original = await lab.api.getCheckRevision({ checkId: rec.checkId, revision: 1 });

    const doc = goodCheck();
    const corrected = {
      ...doc,
      remarks: 'reading 2 was mistyped',
      points: doc.points.map((p) => ({
        ...p,
        readings: p.readings.map((r, i) => (i === 1 ? { ...r, value: '10.0035 GHz' } : r)),
      })),
    };
    const amended = await lab.api.amendCheck({
      checkId: rec.checkId,
      reason: 'transcription error in reading 2',
      document: corrected,
    });
    expect(amended.record.revision).toBe(2);
    expect(amended.record.state).toBe('draft');
    expect(amended.amendment).toEqual({
      reason: 'transcription error in reading 2',
      by: 'local user',
      at: '2026-12-01T09:30:00.000Z',
    });
    expect(amended.changes).toEqual(
      expect.arrayContaining([
        { path: 'remarks', before: '', after: 'reading 2 was mistyped' },
        { path: 'points[0].readings[1].value', before: 10.003e9, after: 10.0035e9 },
      ]),
    );
    // Until the amendment is signed, the signed revision stays the effective one.
    expect(amended.effectiveRevision).toBe(1);
    expect((await lab.api.getCheck(rec.checkId)).revision).toBe(1);
    const kept = await lab.api.getCheckRevision({ checkId: rec.checkId, revision: 1 });
    expect(kept.record).toEqual(original.record);
    expect(kept.signatures).toEqual(original.signatures);
    expect(kept.standardsUsed).toEqual(original.standardsUsed);

    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    const now = await lab.api.getCheckRevision({ checkId: rec.checkId });
    expect(now.effectiveRevision).toBe(2);
    expect(now.revisions.map((r) => `${r.revision}:${r.state}`)).toEqual(['1:amended', '2:signed']);
    const old = await lab.api.getCheckRevision({ checkId: rec.checkId, revision: 1 });
    expect(old.record.points).toEqual(original.record.points);
    expect(old.signatures).toEqual(original.signatures);
    expect((await lab.api.getCheck(rec.checkId)).remarks).toBe('reading 2 was mistyped');
    const detail = await lab.api.getMeter('TW-01');
    expect(detail.checks[0]).toMatchObject({ checkId: rec.checkId, revision: 2, state: 'signed' });

    const trail = await lab.api.listAudit({ entity: 'check', entityId: String(rec.checkId) });
    expect(trail.map((e) => e.action)).toEqual(['sign', 'amend', 'sign', 'sign', 'record']);
    expect(trail[1]?.after).toMatchObject({ revision: 2, reason: 'transcription error in reading 2' });
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
  });

  it('refuse an amendment that changes nothing or moves the check to another meter, writing nothing', async () => {
    const lab = await labWithSigners();
    const rec = await lab.api.recordCheck(goodCheck());
    const before = await countRows(lab);
    await expect(
      lab.api.amendCheck({ checkId: rec.checkId, reason: 'no change', document: goodCheck() }),
    ).rejects.toThrow(/nothing to amend/);
    await expect(
      lab.api.amendCheck({
        checkId: rec.checkId,
        reason: 'wrong meter',
        document: goodCheck({
          meter: 'TW-02',
          points: [
            {
              reference: '3 GHz',
              readings: [
                { value: 6.7, direction: 'up' },
                { value: 6.7, direction: 'down' },
              ],
            },
          ],
        }),
      }),
    ).rejects.toThrow(/cannot move it to TW-02/);
    await expect(
      lab.api.amendCheck({ checkId: rec.checkId, reason: '', document: goodCheck() }),
    ).rejects.toThrow(/reason/);
    expect((await lab.api.getCheckRevision({ checkId: rec.checkId })).revisions).toHaveLength(1);
    expect(await countRows(lab)).toEqual(before);
  });
});

describe('traceability of the standards used', () => {
  async function labWithExpiredStandard() {
    const lab = await labWithSigners();
    await lab.api.createStandard({
      assetId: 'SRC-OLD',
      certificates: [
        {
          certificateId: 'OLD-1',
          issuedBy: 'Calibration body two',
          calibratedOn: '2024-01-10',
          dueOn: '2025-01-10',
          expandedUncertaintyPpm: 0.02,
        },
      ],
    });
    return lab;
  }

  it('refuses a check made with an expired lab standard under the strict policy', async () => {
    const lab = await labWithExpiredStandard();
    expect((await lab.api.getLab()).traceabilityPolicy).toBe('strict');
    await expect(lab.api.recordCheck(goodCheck({ standards: ['SRC-OLD'] }))).rejects.toThrow(
      /standards\[0\]: SRC-OLD had no valid calibration on 2026-11-20 .*OLD-1, 2024-01-10 to 2025-01-10.*strict/,
    );
    expect((await lab.api.getMeter('TW-01')).checks).toEqual([]);
  });

  it('records it with a visible exception under the permissive policy, and shows the standards used', async () => {
    const lab = await labWithExpiredStandard();
    await lab.api.updateLab({ ...(await lab.api.getLab()), traceabilityPolicy: 'permissive' });
    const rec = await lab.api.recordCheck(
      goodCheck({
        standards: ['SRC-OLD', 'SRC-A'],
        points: goodCheck().points.map((p) => ({ ...p, standard: 'SRC-A' })),
      }),
    );
    const view = await lab.api.getCheckRevision({ checkId: rec.checkId });
    expect(view.traceabilityExceptions).toEqual([
      "SRC-OLD had no valid calibration on 2026-11-20 (certificate OLD-1, 2024-01-10 to 2025-01-10); recorded under the lab's permissive traceability policy",
    ]);
    expect(view.standardsUsed).toEqual([
      {
        assetId: 'SRC-A',
        certificateId: 'C-2026-1',
        issuedBy: 'Calibration body one',
        calibratedOn: '2026-06-01',
        dueOn: '2027-06-01',
        validOnCheckDate: true,
      },
      {
        assetId: 'SRC-OLD',
        certificateId: 'OLD-1',
        issuedBy: 'Calibration body two',
        calibratedOn: '2024-01-10',
        dueOn: '2025-01-10',
        validOnCheckDate: false,
      },
    ]);
    // The exception is part of what is signed.
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
  });
});

describe('audit trail', () => {
  it('lists one meter’s entries with its checks and issued documents, and nothing of other meters', async () => {
    const lab = await labWithSigners();
    const mine = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: mine.checkId, person: ADA.name, passphrase: ADA.passphrase });
    const cert = await lab.api.issueCertificate({ checkId: mine.checkId });
    await lab.api.changeMeterState({ assetId: 'TW-02', state: 'quarantined', reason: 'dropped' });
    const trail = await lab.api.listAudit({ meter: 'TW-01' });
    expect(trail.map((e) => `${e.action} ${e.entity} ${e.entityId}`)).toEqual([
      `issue document ${cert.number} revision 1`,
      `sign check ${mine.checkId}`,
      `record check ${mine.checkId}`,
      'create meter TW-01',
    ]);
    // The same entries as asking for the meter, each check and each document one at a time.
    const one = async (entity: string, entityId: string) => lab.api.listAudit({ entity, entityId });
    const apart = [
      ...(await one('meter', 'TW-01')),
      ...(await one('check', String(mine.checkId))),
      ...(await one('document', `${cert.number} revision 1`)),
    ].sort((a, b) => b.id - a.id);
    expect(trail).toEqual(apart);
    expect((await lab.api.listAudit({ meter: 'TW-02' })).map((e) => `${e.action} ${e.entityId}`)).toEqual([
      'change-state TW-02',
      'create TW-02',
    ]);
    expect(await lab.api.listAudit({ meter: 'NOPE-1' })).toEqual([]);
    await expect(lab.api.listAudit({ meter: '  ' })).rejects.toThrow(/meter/);
  });

  it('has an entry for every create, record, sign, amend and state change, chained by hash', async () => {
    const lab = await labWithSigners();
    await lab.api.changeMeterState({
      assetId: 'TW-02',
      state: 'quarantined',
      reason: 'dropped on the bench',
    });
    const trail = await lab.api.listAudit({ limit: 100 });
    const actions = trail.map((e) => `${e.action} ${e.entity}`).reverse();
    expect(actions).toEqual([
      'create lab',
      'create person',
      'create person',
      'create standard',
      'create meter',
      'create meter',
      'create person-key',
      'create person-key',
      'change-state meter',
    ]);
    expect(trail[0]).toMatchObject({
      before: { state: 'in-service' },
      after: { state: 'quarantined', reason: 'dropped on the bench' },
    });
    // No passphrase or private key reaches the trail.
    const text = JSON.stringify(trail);
    expect(text).not.toContain(ADA.passphrase);
    expect(text).not.toContain('PRIVATE KEY');
    await expect(lab.api.listAudit({ limit: 0 })).rejects.toThrow(/limit/);
  });
});
