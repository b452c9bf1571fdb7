// Setting up a lab from nothing and keeping it: identity, people with keys, a standard, meters
// added one by one and from a register CSV, a check signed twice and its certificate issued;
// then specification edits as revisions, new certificates and retirement of a standard, new
// keys, roles and leaving. Every refusal names its field and writes nothing.
import { afterEach, describe, expect, it } from 'vitest';
import { openApi, type OpenedLab } from '../../app/api/open';
import { LabError } from '../../app/api/errors';
import type { MeterInput, StandardInput } from '../../app/api/schemas';
import { clock, goodCheck } from '../fixtures/lab';

const ADA = { name: 'Ada Fenwick', role: 'technician' as const, passphrase: 'ada-passphrase-1' };
const BO = { name: 'Bo Marsh', role: 'reviewer' as const, passphrase: 'bo-passphrase-22' };

const METER: MeterInput = {
  assetId: 'TW-01',
  description: 'X-band absorption meter, direct-reading dial',
  construction: 'waveguide',
  port: 'WR-90',
  min: '8.2 GHz',
  max: '12.4 GHz',
  dialKind: 'direct',
  accuracyRelPpm: 1000,
  resolution: '1 MHz',
  alphaPerK: 19e-6,
  loadedQ: 2000,
  intervalMonths: 12,
  plan: ['8.5 GHz', '10 GHz', '12 GHz'],
};

const STANDARD: StandardInput = {
  assetId: 'SRC-A',
  description: 'Synthesized source',
  kind: 'source',
  min: '250 kHz',
  max: '40 GHz',
  certificates: [
    {
      certificateId: 'C-2026-1',
      issuedBy: 'Calibration body one',
      calibratedOn: '2026-06-01',
      dueOn: '2027-06-01',
      expandedUncertaintyPpm: 0.01,
    },
  ],
};

const REGISTER = `asset_id,description,construction,port,min,max,dial_kind,accuracy_rel_ppm,accuracy_abs,resolution,chart,alpha_per_k,interval_months,plan
TW-10,S-band micrometer meter,coaxial,N female,2 GHz,4 GHz,divisions,2000,0 Hz,0.01,0=4 GHz;5=3.4 GHz;10=2.9 GHz;20=2 GHz,1.7e-5,24,2.5 GHz;3 GHz
TW-11,Ku-band meter,waveguide,WR-62,12.4 GHz,18 GHz,direct,1000,10 kHz,1 MHz,,1.9e-5,12,13 GHz
`;

let opened: OpenedLab[] = [];
afterEach(() => {
  for (const l of opened) l.close();
  opened = [];
});

function emptyLab(): OpenedLab {
  const lab = openApi(':memory:', { create: true, clock });
  opened.push(lab);
  return lab;
}

async function fieldsOfRefusal(p: Promise<unknown>): Promise<string[]> {
  const e = await p.then(
    () => undefined,
    (err: unknown) => err,
  );
  expect(e).toBeInstanceOf(LabError);
  return (e as LabError).issues.map((i) => i.field);
}

async function auditCount(lab: OpenedLab): Promise<number> {
  return (await lab.api.listAudit({ limit: 10000 })).length;
}

/** A lab set up through the API alone, from an empty file. */
async function setUp(): Promise<OpenedLab> {
  const lab = emptyLab();
  await lab.api.updateLab({ name: 'Bench lab', address: '1 Example Street' });
  await lab.api.enrolSigner(ADA);
  await lab.api.enrolSigner(BO);
  await lab.api.createStandard(STANDARD);
  await lab.api.createMeter(METER);
  return lab;
}

describe('a lab from nothing to a signed certificate', () => {
  it('sets up identity, people, a standard and meters, records a check, signs it twice and issues it', async () => {
    const lab = await setUp();
    const imported = await lab.api.importRegister({ csv: REGISTER });
    expect(imported.meters.map((m) => [m.line, m.assetId])).toEqual([
      [2, 'TW-10'],
      [3, 'TW-11'],
    ]);
    expect((await lab.api.listMeters()).map((r) => r.assetId)).toEqual(['TW-01', 'TW-10', 'TW-11']);
    const micrometer = (await lab.api.getMeter('TW-10')).meter;
    expect(micrometer.chart).toEqual([
      { divisions: 0, frequencyHz: 4e9 },
      { divisions: 5, frequencyHz: 3.4e9 },
      { divisions: 10, frequencyHz: 2.9e9 },
      { divisions: 20, frequencyHz: 2e9 },
    ]);
    expect(micrometer.planHz).toEqual([2.5e9, 3e9]);

    const rec = await lab.api.recordCheck(goodCheck());
    expect(rec.asLeftVerdict).toBe('pass');
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    const signed = await lab.api.signCheck({
      checkId: rec.checkId,
      person: BO.name,
      passphrase: BO.passphrase,
    });
    expect(signed.signatures.map((s) => s.meaning)).toEqual(['performed', 'reviewed']);
    const cert = await lab.api.issueCertificate({ checkId: rec.checkId });
    // A PDF file: its magic number (ISO 32000-1 7.5.2).
    expect(Buffer.from(cert.pdfBase64, 'base64').subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const verified = await lab.api.verifyDocument({ pdfBase64: cert.pdfBase64 });
    expect(verified.ok).toBe(true);
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
    // Due a year after the check, the meter's interval (common practice: the check date plus the interval).
    expect((await lab.api.getMeter('TW-01')).register.dueDate).toBe('2027-11-20');
  });
});

describe('a meter specification edit', () => {
  it('is a new revision with its reason; stored results keep theirs; the due date follows the new interval', async () => {
    const lab = await setUp();
    const rec = await lab.api.recordCheck(goodCheck());
    const before = await lab.api.getCheck(rec.checkId);
    const d = await lab.api.editMeter({
      assetId: 'TW-01',
      reason: 'maker data sheet, revision B',
      changes: { accuracyRelPpm: 500, intervalMonths: 24 },
    });
    expect(d.meter.accuracyRelPpm).toBe(500);
    expect(d.meter.planHz).toEqual([8.5e9, 10e9, 12e9]);
    expect(d.revisions).toHaveLength(1);
    const r = d.revisions?.[0];
    expect(r?.revision).toBe(2);
    expect(r?.effectiveFrom).toBe('2026-12-01');
    expect(r?.reason).toBe('maker data sheet, revision B');
    expect(r?.before.accuracyRelPpm).toBe(1000);
    expect(r?.after.accuracyRelPpm).toBe(500);
    expect(await lab.api.getCheck(rec.checkId)).toEqual(before);
    expect(d.register.dueDate).toBe('2028-11-20');
    // A check recorded after the edit is judged against the new tolerance: 500 ppm of 10 GHz = 5 MHz.
    const after = await lab.api.recordCheck(goodCheck({ date: '2026-11-30' }));
    expect(after.points[0]?.result.decision.toleranceHz).toBeCloseTo(5e6, -4);
    expect(before.points[0]?.result.decision.toleranceHz).toBeCloseTo(10e6, -4);
    const trail = await lab.api.listAudit({ entity: 'meter', entityId: 'TW-01' });
    expect(trail[0]?.action).toBe('edit-specification');
  });

  it('refuses the asset id, the state, unknown fields and no change, writing nothing', async () => {
    const lab = await setUp();
    const n = await auditCount(lab);
    for (const changes of [{ assetId: 'X' }, { state: 'withdrawn' }, { colour: 'red' }, {}])
      await expect(lab.api.editMeter({ assetId: 'TW-01', reason: 'because', changes })).rejects.toThrow(
        LabError,
      );
    await expect(
      lab.api.editMeter({ assetId: 'TW-01', reason: 'same', changes: { accuracyRelPpm: 1000 } }),
    ).rejects.toThrow(/nothing to change/);
    expect(
      await fieldsOfRefusal(
        lab.api.editMeter({ assetId: 'TW-01', reason: 'narrow', changes: { max: '8 GHz' } }),
      ),
    ).toContain('max');
    expect(await auditCount(lab)).toBe(n);
  });
});

describe('refusals name the field and write nothing', () => {
  const cases: [string, Partial<MeterInput>, string][] = [
    ['band min above max', { min: '12 GHz', max: '9 GHz' }, 'max'],
    ['accuracy negative', { accuracyRelPpm: -5 }, 'accuracyRelPpm'],
    ['accuracy over 100 %', { accuracyRelPpm: 1_000_001 }, 'accuracyRelPpm'],
    ['plan frequency outside the band', { plan: ['15 GHz'] }, 'plan[0]'],
    ['interval of 0 months', { intervalMonths: 0 }, 'intervalMonths'],
    ['unknown field', { colour: 'red' } as Partial<MeterInput>, '(document)'],
  ];
  for (const [what, change, field] of cases)
    it(`refuses a meter with ${what}`, async () => {
      const lab = await setUp();
      const n = await auditCount(lab);
      const fields = await fieldsOfRefusal(lab.api.createMeter({ ...METER, assetId: 'TW-99', ...change }));
      expect(fields).toContain(field);
      expect(await auditCount(lab)).toBe(n);
      await expect(lab.api.getMeter('TW-99')).rejects.toThrow(/no meter/);
    });

  it('refuses a duplicate asset id, in the API and in a register import', async () => {
    const lab = await setUp();
    expect(await fieldsOfRefusal(lab.api.createMeter(METER))).toEqual(['assetId']);
    const csv = REGISTER.replace('TW-11', 'TW-01');
    const e = await lab.api.importRegister({ csv }).catch((x: unknown) => x as LabError);
    expect(e).toBeInstanceOf(LabError);
    expect((e as LabError).issues.map((i) => i.message)).toEqual([
      expect.stringMatching(
        /^line 3, column asset_id: "TW-01": expected an asset id not already in the register/,
      ),
    ]);
    expect((await lab.api.listMeters()).map((r) => r.assetId)).toEqual(['TW-01']);
  });

  it('refuses a certificate due before its calibration date', async () => {
    const lab = await setUp();
    const n = await auditCount(lab);
    const cert = {
      ...STANDARD.certificates[0]!,
      certificateId: 'C-2027-1',
      calibratedOn: '2027-05-01',
      dueOn: '2027-04-01',
    };
    expect(
      await fieldsOfRefusal(lab.api.addStandardCertificate({ assetId: 'SRC-A', certificate: cert })),
    ).toEqual(['certificate.dueOn']);
    expect(
      await fieldsOfRefusal(lab.api.createStandard({ ...STANDARD, assetId: 'SRC-B', certificates: [cert] })),
    ).toEqual(['certificates[0].dueOn']);
    expect(await auditCount(lab)).toBe(n);
  });
});

describe('the register CSV import', () => {
  it('names every bad cell by line, column, value and expectation, and writes none of the rows', async () => {
    const lab = await setUp();
    const bad = REGISTER.replace('2000,0 Hz,0.01', '-3,0 Hz,0.01').replace(
      '12.4 GHz,18 GHz',
      '18 GHz,12.4 GHz',
    );
    const e = (await lab.api.importRegister({ csv: bad }).catch((x: unknown) => x)) as LabError;
    expect(e).toBeInstanceOf(LabError);
    const messages = e.issues.map((i) => i.message);
    expect(messages).toContainEqual(expect.stringMatching(/^line 2, column accuracy_rel_ppm: -3: expected/));
    expect(messages).toContainEqual(expect.stringMatching(/^line 3, column max: "12.4 GHz": expected/));
    expect((await lab.api.listMeters()).map((r) => r.assetId)).toEqual(['TW-01']);
  });

  it('checks without writing on a dry run, and an export reads back as the same register', async () => {
    const lab = await setUp();
    const dry = await lab.api.importRegister({ csv: REGISTER, dryRun: true });
    expect(dry.dryRun).toBe(true);
    expect(dry.meters).toHaveLength(2);
    expect((await lab.api.listMeters()).map((r) => r.assetId)).toEqual(['TW-01']);
    await lab.api.importRegister({ csv: REGISTER });
    const csv = await lab.api.exportRegister();
    const other = emptyLab();
    await other.api.updateLab({ name: 'Second lab' });
    await other.api.importRegister({ csv });
    for (const id of ['TW-01', 'TW-10', 'TW-11'])
      expect((await other.api.getMeter(id)).meter).toEqual((await lab.api.getMeter(id)).meter);
    expect(await other.api.exportRegister()).toBe(csv);
  });
});

describe('standards', () => {
  it('records a new certificate with its as-found deviation, and a retired standard is refused after the day', async () => {
    const lab = await setUp();
    const s = await lab.api.addStandardCertificate({
      assetId: 'SRC-A',
      certificate: {
        certificateId: 'C-2027-1',
        issuedBy: 'Calibration body one',
        calibratedOn: '2027-05-20',
        dueOn: '2028-05-20',
        expandedUncertaintyPpm: 0.02,
        coverageFactor: 2,
        asFoundPpm: 0.013,
      },
    });
    expect(s.dueOn).toBe('2028-05-20');
    expect(s.certificates[0]).toMatchObject({ certificateId: 'C-2027-1', asFoundPpm: 0.013 });
    expect(s.kind).toBe('source');
    expect([s.minHz, s.maxHz]).toEqual([250e3, 40e9]);
    const retired = await lab.api.retireStandard({ assetId: 'SRC-A', reason: 'replaced by a newer source' });
    expect(retired.retiredOn).toBe('2026-12-01');
    // Retired today: a check dated today still counts, one dated after it does not.
    await expect(lab.api.recordCheck(goodCheck({ date: '2026-12-01' }))).resolves.toBeDefined();
    expect(await fieldsOfRefusal(lab.api.recordCheck(goodCheck({ date: '2026-12-02' })))).toContain(
      'standards[0]',
    );
  });
});

describe('people', () => {
  it('gets a new key: old signatures stay verifiable, the new passphrase signs, the old one no longer does', async () => {
    const lab = await setUp();
    const first = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: first.checkId, person: ADA.name, passphrase: ADA.passphrase });
    const before = (await lab.api.listSigners()).find((s) => s.person.name === ADA.name)?.keyFingerprint;
    const s = await lab.api.rekeySigner({ name: ADA.name, passphrase: 'ada-new-passphrase' });
    expect(s.keyFingerprint).not.toBe(before);
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
    const second = await lab.api.recordCheck(goodCheck({ date: '2026-11-25' }));
    await expect(
      lab.api.signCheck({ checkId: second.checkId, person: ADA.name, passphrase: ADA.passphrase }),
    ).rejects.toThrow(LabError);
    await lab.api.signCheck({ checkId: second.checkId, person: ADA.name, passphrase: 'ada-new-passphrase' });
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
  });

  it('changes a role, and one who left keeps their signatures and cannot sign again', async () => {
    const lab = await setUp();
    const p = await lab.api.changeRole({ name: BO.name, role: 'administrator', reason: 'runs the lab now' });
    expect(p.role).toBe('administrator');
    const rec = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    const left = await lab.api.markPersonLeft({ name: ADA.name, reason: 'moved on' });
    expect(left.leftOn).toBe('2026-12-01');
    const again = await lab.api.recordCheck(goodCheck({ date: '2026-11-25' }));
    expect(
      await fieldsOfRefusal(
        lab.api.signCheck({ checkId: again.checkId, person: ADA.name, passphrase: ADA.passphrase }),
      ),
    ).toEqual(['person']);
    const view = await lab.api.getCheckRevision({ checkId: rec.checkId });
    expect(view.signatures.map((s) => s.printedName)).toEqual([ADA.name]);
    expect((await lab.api.verifyIntegrity()).ok).toBe(true);
    expect(
      await fieldsOfRefusal(lab.api.rekeySigner({ name: ADA.name, passphrase: 'a-new-one-123' })),
    ).toEqual(['name']);
  });
});
