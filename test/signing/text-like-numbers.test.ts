// A text field that reads exactly like a non-finite number ("NaN", "Infinity") stays text all
// the way through: stored, read back, signed, embedded in a certificate and verified. The JSON
// dialect (app/model/json.ts) writes non-finite numbers as those very strings, so only a reader
// that knows which fields are text can tell them apart (common practice: type-directed decoding).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { OpenedLab } from '../../app/api/open';
import { decodeJson, encodeJson } from '../../app/model/json';
import { goodCheck, seededLab } from '../fixtures/lab';

const PERFORMER = { name: 'Infinity', passphrase: 'infinity-passphrase-1' };
const REVIEWER = { name: 'Bo Marsh', passphrase: 'bo-marsh-passphrase-1' };

let lab: OpenedLab;
beforeAll(async () => {
  lab = await seededLab();
  await lab.api.enrolSigner({ ...PERFORMER, role: 'technician' });
  await lab.api.enrolSigner(REVIEWER);
}, 120_000);
afterAll(() => lab.close());

describe('text that looks like a non-finite number', () => {
  it('reads back as text, while number fields still read back as Infinity', () => {
    const value = { remarks: 'NaN', performer: 'Infinity', standards: ['NaN'], dof: Infinity, u: [NaN] };
    const back = decodeJson(encodeJson(value)) as typeof value;
    expect(back.remarks).toBe('NaN');
    expect(back.performer).toBe('Infinity');
    expect(back.standards).toEqual(['NaN']);
    expect(back.dof).toBe(Infinity);
    expect(back.u[0]).toBeNaN();
  });

  it('goes record -> sign -> certificate -> verify and verifies', async () => {
    const rec = await lab.api.recordCheck(goodCheck({ performer: PERFORMER.name, remarks: 'NaN' }));
    const stored = await lab.api.getCheck(rec.checkId);
    expect(stored.remarks).toBe('NaN');
    expect(stored.performer).toBe('Infinity');
    // The record keeps its non-finite numbers too (Type B lines have infinite degrees of freedom).
    const dofs = stored.points[0]?.result.budget.contributions.map((c) => c.dof) ?? [];
    expect(dofs).toContain(Infinity);

    await lab.api.signCheck({
      checkId: rec.checkId,
      person: PERFORMER.name,
      passphrase: PERFORMER.passphrase,
    });
    await lab.api.signCheck({ checkId: rec.checkId, person: REVIEWER.name, passphrase: REVIEWER.passphrase });
    const integrity = await lab.api.verifyIntegrity();
    expect(integrity.problems).toEqual([]);

    const cert = await lab.api.issueCertificate({ checkId: rec.checkId });
    const v = await lab.api.verifyDocument({ pdfBase64: cert.pdfBase64 });
    expect(v.findings.filter((f) => f.status === 'fail')).toEqual([]);
    expect(v.ok).toBe(true);
  });
});
