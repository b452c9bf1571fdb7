// Refused signing attempts are written to the audit trail (who, which check and meaning, when,
// why; never the passphrase), and after 5 wrong passphrases within 15 minutes a person may not
// sign for 15 minutes. Source: 21 CFR Part 11 11.300(d) (attempts at unauthorized use detected
// and reported); the figures 5 and 15 minutes are common practice for interactive logins.
import { describe, expect, it } from 'vitest';
import { createLabService } from '../../app/api/service';
import type { Clock } from '../../app/api/clock';
import { openLabDb } from '../../db/store';
import { goodCheck, seed } from '../fixtures/lab';

const ADA = { name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' };

/** A fixed clock the test moves by hand. */
function movableClock(start: string): Clock & { advanceMinutes(m: number): void } {
  let ms = Date.parse(start);
  return {
    now: () => new Date(ms).toISOString(),
    today: () => new Date(ms).toISOString().slice(0, 10),
    advanceMinutes: (m) => {
      ms += m * 60_000;
    },
  };
}

async function bench() {
  const clock = movableClock('2026-12-01T09:30:00.000Z');
  const db = openLabDb(':memory:');
  const api = createLabService(db, { clock });
  await seed(api);
  await api.enrolSigner(ADA);
  const c = await api.recordCheck(goodCheck());
  return { clock, api, checkId: c.checkId };
}

const wrong = (checkId: number) => ({ checkId, person: ADA.name, passphrase: 'not-her-passphrase' });

describe('refused signing attempts', () => {
  it('are recorded in the audit trail without the passphrase', async () => {
    const { api, checkId } = await bench();
    await expect(api.signCheck(wrong(checkId))).rejects.toThrow(/does not open/);
    const entries = await api.listAudit({ entity: 'person' });
    const refused = entries.filter((e) => e.action === 'sign-refused');
    expect(refused).toHaveLength(1);
    expect(refused[0]!.at).toBe('2026-12-01T09:30:00.000Z');
    expect(refused[0]!.after).toEqual({
      person: ADA.name,
      checkId,
      meaning: 'performed',
      reason: 'wrong passphrase',
    });
    expect(JSON.stringify(entries)).not.toContain('not-her-passphrase');
    expect((await api.verifyIntegrity()).ok).toBe(true);
  });

  it('locks a person out for 15 minutes after 5 wrong passphrases within 15 minutes', async () => {
    const { clock, api, checkId } = await bench();
    for (let i = 0; i < 5; i++) {
      await expect(api.signCheck(wrong(checkId))).rejects.toThrow(/does not open/);
      clock.advanceMinutes(3); // the fifth at 09:42, within 15 minutes of the first
    }
    // 09:45: the right passphrase is refused too, saying until when.
    await expect(api.signCheck({ checkId, person: ADA.name, passphrase: ADA.passphrase })).rejects.toThrow(
      /Ada Fenwick may not sign until 2026-12-01T09:57:00.000Z: 5 wrong passphrases within 15 minutes/,
    );
    const audit = await api.listAudit({ entity: 'person' });
    expect(audit.filter((e) => e.action === 'sign-refused')).toHaveLength(6);
    expect(audit[0]!.after).toMatchObject({ reason: 'locked out after repeated wrong passphrases' });
    clock.advanceMinutes(11); // 09:56: still locked
    await expect(api.signCheck({ checkId, person: ADA.name, passphrase: ADA.passphrase })).rejects.toThrow(
      /may not sign until/,
    );
    clock.advanceMinutes(1); // 09:57: the lock has ended
    const view = await api.signCheck({ checkId, person: ADA.name, passphrase: ADA.passphrase });
    expect(view.signatures).toHaveLength(1);
  });

  it('does not lock out for 5 wrong passphrases spread over more than 15 minutes', async () => {
    const { clock, api, checkId } = await bench();
    for (let i = 0; i < 5; i++) {
      await expect(api.signCheck(wrong(checkId))).rejects.toThrow(/does not open/);
      clock.advanceMinutes(4); // 09:30 ... 09:46: 16 minutes from first to fifth
    }
    const view = await api.signCheck({ checkId, person: ADA.name, passphrase: ADA.passphrase });
    expect(view.signatures).toHaveLength(1);
  });
});
