// @vitest-environment happy-dom
// "Log this use" on a fit-for-use answer: sends the meter, the frequency with its unit and the
// purpose to logUse, tells what was logged, and tells a refusal in words.
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { UseInput } from '../../app/api/contract-impact';
import { LabError } from '../../app/api/errors';
import { LabProvider } from '../../renderer/src/lab/LabContext';
import { LogUse } from '../../renderer/src/use/LogUse';
import { fakeLabApi } from '../e2e/fixtures/fakeLab';

afterEach(cleanup);

describe('Log this use', () => {
  it('logs the use and says by whom and when', async () => {
    const asked: UseInput[] = [];
    const api = fakeLabApi({
      logUse: (u) => {
        asked.push(u);
        return Promise.resolve({
          id: 3,
          assetId: 'TW-01',
          usedAt: '2026-12-01T09:30:00.000Z',
          usedBy: 'Ada Fenwick',
          frequencyHz: 9.375e9,
          purpose: 'job 4471',
        });
      },
    });
    render(
      <LabProvider api={api}>
        <LogUse assetId="TW-01" frequencyHz={9.375e9} />
      </LabProvider>,
    );
    fireEvent.change(screen.getByLabelText('What it is used for'), { target: { value: ' job 4471 ' } });
    fireEvent.click(screen.getByRole('button', { name: 'Log this use' }));
    await waitFor(() =>
      expect(screen.getByRole('status').textContent).toMatch(/Logged: TW-01 .* by Ada Fenwick/),
    );
    expect(asked).toEqual([{ meter: 'TW-01', at: '9375000000 Hz', purpose: 'job 4471' }]);
  });

  it('tells a refusal in words', async () => {
    const api = fakeLabApi({
      logUse: () =>
        Promise.reject(
          LabError.field(
            'purpose',
            '',
            'what the meter was used for',
            'purpose: say what the meter was used for',
          ),
        ),
    });
    render(
      <LabProvider api={api}>
        <LogUse assetId="TW-01" frequencyHz={9.375e9} />
      </LabProvider>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Log this use' }));
    await waitFor(() =>
      expect(screen.getByRole('status').textContent).toMatch(/purpose: say what the meter was used for/),
    );
  });
});
