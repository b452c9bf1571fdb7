// @vitest-environment happy-dom
// Setting up a lab in the window: "Add a meter" with micrometer chart rows pasted and drawn before
// saving, the refusal the service names shown with nothing written, and the first-run guide of an
// empty lab in its order (identity, people, standards, meters, first check).
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { LabProvider } from '../../renderer/src/lab/LabContext';
import { AddMeterForm } from '../../renderer/src/setup/AddMeterForm';
import { FirstRunGuide } from '../../renderer/src/setup/FirstRunGuide';
import { readChartRows } from '../../renderer/src/setup/chartRows';

afterEach(cleanup);

const type = (label: RegExp, value: string) =>
  fireEvent.change(screen.getByLabelText(label), { target: { value } });

function fakeApi(createMeter: (doc: unknown) => Promise<unknown>): LabApi {
  return {
    createMeter,
    getLab: () => Promise.reject(new LabError('refused', 'no lab settings yet')),
    listSigners: () => Promise.resolve([]),
    listStandards: () => Promise.resolve([]),
    listMeters: () => Promise.resolve([]),
  } as unknown as LabApi;
}

describe('chart rows', () => {
  it('reads pasted rows with any separator, passes over a header and names bad lines', () => {
    const r = readChartRows('divisions,frequency\n0, 4 GHz\n5;3.4 GHz\n10\t2.9 GHz\nten, 2 GHz\n');
    expect(r.rows).toEqual([
      { divisions: 0, frequency: '4 GHz' },
      { divisions: 5, frequency: '3.4 GHz' },
      { divisions: 10, frequency: '2.9 GHz' },
    ]);
    expect(r.problems).toEqual([
      'line 5: "ten, 2 GHz": expected divisions and a frequency, such as "12.5, 9.3 GHz"',
    ]);
  });
});

describe('Add a meter', () => {
  it('draws pasted chart rows before saving and sends the meter document', async () => {
    const sent: unknown[] = [];
    let added = '';
    render(
      <LabProvider
        api={fakeApi((doc) => {
          sent.push(doc);
          return Promise.resolve({ assetId: 'TW-02' });
        })}
      >
        <AddMeterForm onAdded={(a) => (added = a)} />
      </LabProvider>,
    );
    type(/^Asset id/, 'TW-02');
    type(/^Band from/, '2 GHz');
    type(/^Band to/, '4 GHz');
    fireEvent.change(screen.getByLabelText(/^Dial$/), { target: { value: 'divisions' } });
    type(/^Dial resolution/, '0.01');
    type(/^Paste rows/, '0, 4 GHz\n10, 2.9 GHz\n20, 2 GHz');
    expect(screen.getAllByTestId('chart-point')).toHaveLength(3);
    expect(screen.getByRole('img').getAttribute('aria-label')).toMatch(
      /3 rows: 4\.000 GHz at 0 div to 2\.000 GHz at 20 div/,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Add the meter' }));
    await waitFor(() => expect(added).toBe('TW-02'));
    expect(sent[0]).toMatchObject({
      assetId: 'TW-02',
      min: '2 GHz',
      max: '4 GHz',
      dialKind: 'divisions',
      resolution: 0.01,
      chart: [
        { divisions: 0, frequency: '4 GHz' },
        { divisions: 10, frequency: '2.9 GHz' },
        { divisions: 20, frequency: '2 GHz' },
      ],
    });
  });

  it('shows every field the service refused and says nothing was changed', async () => {
    const refusal = LabError.invalid([
      {
        field: 'max',
        value: '1 GHz',
        expected: 'a frequency above min',
        message: 'max: "1 GHz" is not above min "2 GHz"',
      },
    ]);
    render(
      <LabProvider api={fakeApi(() => Promise.reject(refusal))}>
        <AddMeterForm onAdded={() => undefined} />
      </LabProvider>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Add the meter' }));
    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toMatch(/The meter was not added; nothing was changed/);
    expect(alert.textContent).toMatch(/max: "1 GHz" is not above min "2 GHz"/i);
  });
});

describe('the first-run guide', () => {
  it('lists the set-up steps in order, none done in an empty lab', async () => {
    render(
      <LabProvider api={fakeApi(() => Promise.reject(new Error('unused')))}>
        <FirstRunGuide onAddMeter={() => undefined} />
      </LabProvider>,
    );
    const items = await screen.findAllByRole('listitem');
    expect(items.map((li) => li.textContent?.split(':')[0])).toEqual([
      "The lab's name and address for its documents",
      'The people who perform and review checks, each with a signing key',
      'The lab standards (sources, counters) with their certificates',
      'The meters of the register',
      'The first check of a meter',
    ]);
    expect(items.some((li) => li.className === 'done')).toBe(false);
  });
});
