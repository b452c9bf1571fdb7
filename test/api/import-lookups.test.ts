// What a bulk import now reads once instead of once per check (issue 8): the lab's people by
// name, and the dates each meter already has checks on. The answers must be those of looking up
// every check: a check already recorded on a meter and date is refused naming that check (the
// words recordCheck uses, after the CSV lines), whichever revision holds the date; a performer
// named in another letter case is the lab's person, not a new one; a new performer named by
// several checks is created once; and the checks an import stores are those recordCheck stores.
import { describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { goodCheck, seededLab } from '../fixtures/lab';

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

const OTHER_DATES = ['2026-10-01', '2026-10-02', '2026-10-05'];

/** The history CSV of a lab holding goodCheck() and a check on each of OTHER_DATES. */
async function historyWithGoodCheck(): Promise<string> {
  const lab = await seededLab();
  for (const date of OTHER_DATES) await lab.api.recordCheck(goodCheck({ date }));
  await lab.api.recordCheck(goodCheck());
  return lab.api.exportCsv();
}

const stored = async (api: LabApi) => {
  const out: unknown[] = [];
  for (const m of await api.listMeters())
    for (const c of (await api.getMeter(m.assetId)).checks) out.push(await api.getCheck(c.checkId));
  return out;
};

describe('an import with lookups kept for the whole file', () => {
  it('refuses a check already recorded on that meter and date as recordCheck does, naming it', async () => {
    const csv = await historyWithGoodCheck();
    const lab = await seededLab();
    const recorded = await lab.api.recordCheck(goodCheck());
    const alone = await refusal(lab.api.recordCheck(goodCheck()));
    expect(alone.message).toBe(
      `date: a check of TW-01 on 2026-11-20 is already recorded (check ${recorded.checkId}); amend it instead`,
    );
    const before = await lab.api.exportCsv();
    const e = await refusal(lab.api.importCsv(csv));
    expect(e.message).toMatch(/^lines \d+-\d+: /);
    expect(e.message.replace(/^lines \d+-\d+: /, '')).toBe(alone.message);
    expect(await lab.api.exportCsv()).toBe(before);
  });

  it('counts a date held by any revision of a check, as looking each check up did', async () => {
    const csv = await historyWithGoodCheck();
    const lab = await seededLab();
    const recorded = await lab.api.recordCheck(goodCheck());
    // Amended to the next day: the first revision still holds 2026-11-20.
    await lab.api.amendCheck({
      checkId: recorded.checkId,
      reason: 'date written wrongly on the sheet',
      document: goodCheck({ date: '2026-11-21' }),
    });
    const e = await refusal(lab.api.importCsv(csv));
    expect(e.message).toMatch(
      new RegExp(
        `^lines \\d+-\\d+: date: a check of TW-01 on 2026-11-20 is already recorded \\(check ${recorded.checkId}\\)`,
      ),
    );
    const moved = csv.replaceAll(',2026-11-20,', ',2026-11-21,');
    const e2 = await refusal(lab.api.importCsv(moved));
    expect(e2.message).toMatch(
      new RegExp(
        `^lines \\d+-\\d+: date: a check of TW-01 on 2026-11-21 is already recorded \\(check ${recorded.checkId}\\)`,
      ),
    );
    // Without that check the rest of the file imports.
    const others = csv
      .split('\r\n')
      .filter((l) => !l.includes(',2026-11-20,'))
      .join('\r\n');
    const r = await lab.api.importCsv(others);
    expect(r.checksImported).toBe(OTHER_DATES.length);
  });

  it('stores what recordCheck stores, and a performer in other letter case is the lab person', async () => {
    const csv = await historyWithGoodCheck();
    const recordedLab = await seededLab();
    for (const date of OTHER_DATES) await recordedLab.api.recordCheck(goodCheck({ date }));
    await recordedLab.api.recordCheck(goodCheck());
    const lab = await seededLab();
    const people = await lab.api.listPeople();
    const r = await lab.api.importCsv(csv.replaceAll(',Ada Fenwick,', ',ADA FENWICK,'));
    expect(r.checksImported).toBe(OTHER_DATES.length + 1);
    // Matched without regard to letter case, as findPersonByName always did: no new person.
    expect(await lab.api.listPeople()).toEqual(people);
    expect(await stored(lab.api)).toEqual(await stored(recordedLab.api));
    expect((await stored(lab.api)).length).toBe(OTHER_DATES.length + 1);
  });

  it('creates a new performer once for all the checks naming them', async () => {
    const csv = await historyWithGoodCheck();
    const lab = await seededLab();
    const people = (await lab.api.listPeople()).length;
    await lab.api.importCsv(csv.replaceAll(',Ada Fenwick,', ',Lior Castellane,'));
    const after = await lab.api.listPeople();
    expect(after).toHaveLength(people + 1);
    const lior = after.find((p) => p.name === 'Lior Castellane');
    expect(lior?.role).toBe('technician');
    const performers = new Set((await stored(lab.api)).map((c) => (c as { performer: string }).performer));
    expect([...performers]).toEqual(['Lior Castellane']);
  });

  it('imports the same file into two labs alike, one after a refused import', async () => {
    const csv = await historyWithGoodCheck();
    const a = await seededLab();
    const b = await seededLab();
    // A refused import (bad reading in the last check) first: nothing it looked up lingers.
    const lines = csv.split('\r\n');
    const last = lines.length - 2;
    const cells = (lines[last] ?? '').split(',');
    cells[16] = 'abc';
    lines[last] = cells.join(',');
    await refusal(b.api.importCsv(lines.join('\r\n')));
    await a.api.importCsv(csv);
    await b.api.importCsv(csv);
    expect(await b.api.exportCsv()).toBe(await a.api.exportCsv());
  });
});
