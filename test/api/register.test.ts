// listRegister: every meter's register row with its history flags, the same flags the due list
// gives for the meters it lists, and the same rows listMeters gives (common practice: one source
// for the register page instead of a due list asked for ten years ahead).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openApi, type OpenedLab } from '../../app/api/open';
import { loadBundle, readSampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';

let lab: OpenedLab;

beforeAll(async () => {
  lab = openApi(':memory:', { create: true, clock });
  await loadBundle(lab.api, readSampleBundle());
}, 120_000);

afterAll(() => lab.close());

describe('listRegister', () => {
  it('gives every meter, as listMeters does, each with the flags the due list shows', async () => {
    const register = await lab.api.listRegister();
    const meters = await lab.api.listMeters();
    expect(register.map(({ flags: _f, ...r }) => r)).toEqual(meters);
    const due = await lab.api.listDue({ withinDays: 3650 });
    expect(due.length).toBeGreaterThan(0);
    for (const d of due) {
      const row = register.find((r) => r.assetId === d.assetId);
      expect(row?.flags, d.assetId).toEqual(d.flags);
    }
    // The demo lab has meters with history worth attention.
    expect(register.some((r) => r.flags.length > 0)).toBe(true);
    // Withdrawn meters are in the register but never in the due list.
    const withdrawn = register.filter((r) => r.state === 'withdrawn');
    for (const w of withdrawn) expect(due.some((d) => d.assetId === w.assetId)).toBe(false);
  });
});
