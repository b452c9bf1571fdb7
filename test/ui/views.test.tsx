// @vitest-environment happy-dom
// The views beyond the register, in happy-dom against a fake LabApi: navigation, a meter's page
// with its chart and state change, recording a check with live judgement and a draft saved as
// it is typed, the lab standards and the settings. (The coverage strip: register-view.test.tsx.)
import { act, cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { App } from '../../renderer/src/App';
import { MeterPage } from '../../renderer/src/meter/MeterPage';
import { RecordCheckPage } from '../../renderer/src/record/RecordCheckPage';
import { SettingsPage } from '../../renderer/src/settings/SettingsPage';
import { StandardsPage } from '../../renderer/src/standards/StandardsPage';
import {
  fromDocument,
  toDocument,
  readingValue,
  availabilityOn,
  emptyForm,
} from '../../renderer/src/record/checkForm';
import { parseRoute } from '../../renderer/src/shared/routes';
import { LabError } from '../../app/api/errors';
import { BENCH_STANDARDS, fakeBench } from '../e2e/fixtures/fakeBench';
import { LabProvider } from '../../renderer/src/lab/LabContext';

afterEach(cleanup);
beforeEach(() => {
  window.location.hash = '';
});

const type = (el: HTMLElement, value: string) => fireEvent.change(el, { target: { value } });

describe('navigation', () => {
  it('reads views from the address and follows the navigation bar', async () => {
    expect(parseRoute('#/meter/WG%2F201')).toEqual({ view: 'meter', assetId: 'WG/201' });
    expect(parseRoute('#/record/draft/7')).toEqual({ view: 'record', draftId: 7 });
    expect(parseRoute('')).toEqual({ view: 'register' });
    expect(parseRoute('#/nowhere').view).toBe('missing');

    const { api } = fakeBench();
    window.location.hash = '#/standards';
    render(<App api={api} />);
    expect(await screen.findByRole('heading', { level: 1, name: 'Lab standards' })).toBeTruthy();
    const nav = screen.getByRole('navigation', { name: 'Views' });
    expect(within(nav).getByRole('link', { name: 'Lab standards' }).getAttribute('aria-current')).toBe(
      'page',
    );
    await act(async () => {
      window.location.hash = '#/settings';
      window.dispatchEvent(new HashChangeEvent('hashchange'));
      await Promise.resolve();
    });
    expect(await screen.findByRole('heading', { level: 1, name: 'Settings' })).toBeTruthy();
    expect(within(nav).getByRole('link', { name: 'Settings' }).getAttribute('aria-current')).toBe('page');
  });

  it('says so when an address names no view', async () => {
    window.location.hash = '#/nowhere';
    render(<App api={fakeBench().api} />);
    expect((await screen.findByRole('alert')).textContent).toContain('#/nowhere');
  });
});

describe('a meter page', () => {
  it('shows identity, maximum input power, due date, checks and a chart with units', async () => {
    const { api } = fakeBench();
    render(
      <LabProvider api={api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const power = await screen.findByRole('complementary', { name: 'Maximum input power' });
    expect(power.textContent).toContain('2 W (33.0 dBm)');
    expect(screen.getByTestId('meter-state').textContent).toContain('In service');
    expect(screen.getByTestId('meter-due').textContent).toBe('2025-11-10 (21 d overdue)');
    expect(screen.getByText('±1000 ppm (0.1 %) of reading')).toBeTruthy();
    const rows = document.querySelectorAll('tr[data-check-id]');
    expect([...rows].map((r) => r.getAttribute('data-date'))).toEqual(['2025-01-15', '2024-01-10']);
    await waitFor(() => expect(document.querySelector('.recharts-surface')).not.toBeNull());
    const chartText = document.querySelector('figure.chart')?.textContent ?? '';
    expect(chartText).toContain('reference frequency / GHz');
    expect(chartText).toContain('error / ppm');
    expect(chartText).toContain('2025-01-15');
    // Three points per check, each with its U bar.
    await waitFor(() =>
      expect(document.querySelectorAll('.recharts-errorBar').length).toBeGreaterThanOrEqual(6),
    );
  });

  it('opens a check to show its points with units', async () => {
    const { api } = fakeBench();
    render(
      <LabProvider api={api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const row = (await screen.findAllByRole('button', { name: 'Points' }))[0]!;
    fireEvent.click(row);
    expect(await screen.findByText('+120.0 ppm')).toBeTruthy();
    expect(screen.getAllByText('±60 ppm (2.00)').length).toBe(3);
    expect(screen.getByText('8.5000 GHz')).toBeTruthy();
  });

  it('changes the state with a reason and shows the new state', async () => {
    const bench = fakeBench();
    render(
      <LabProvider api={bench.api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    type(await screen.findByLabelText('Reason (kept in the audit trail)'), 'dropped on the bench');
    fireEvent.click(screen.getByRole('button', { name: 'Quarantine' }));
    await waitFor(() => expect(screen.getByTestId('meter-state').textContent).toContain('Quarantined'));
    expect(bench.calls.find((c) => c.op === 'changeMeterState')?.args[0]).toEqual({
      assetId: 'WM-003',
      state: 'quarantined',
      reason: 'dropped on the bench',
    });
  });

  it('says why a meter cannot be shown', async () => {
    render(
      <LabProvider api={fakeBench().api}>
        <MeterPage assetId="NOPE-1" />
      </LabProvider>,
    );
    expect((await screen.findByRole('alert')).textContent).toContain('no meter with asset id "NOPE-1"');
  });
});

describe('recording a check', () => {
  async function openForm() {
    const bench = fakeBench();
    render(
      <LabProvider api={bench.api}>
        <RecordCheckPage assetId="WM-003" />
      </LabProvider>,
    );
    await screen.findByTestId('meter-brief');
    return bench;
  }

  function fillConditions() {
    type(screen.getByLabelText('Temperature / °C'), '21.5');
    type(screen.getByLabelText('Pressure / hPa'), '1009');
    type(screen.getByLabelText('Relative humidity / %RH'), '44');
    fireEvent.change(screen.getByLabelText('Performed by'), { target: { value: 'Tess Quarry' } });
    fireEvent.click(screen.getByRole('checkbox', { name: /SRC-1/ }));
  }

  it('fills the points from the plan and shows expired standards unavailable, with why', async () => {
    await openForm();
    const refs = screen.getAllByLabelText<HTMLInputElement>(/Reference frequency of point/);
    expect(refs.map((r) => r.value)).toEqual(['8.5 GHz', '10 GHz', '12 GHz']);
    const old = document.querySelector('[data-standard="SRC-OLD"]')!;
    expect(within(old as HTMLElement).getByRole<HTMLInputElement>('checkbox').disabled).toBe(true);
    expect(old.textContent).toContain('certificate FX-2019-4 expired on 2020-03-01');
    expect(screen.getByRole<HTMLInputElement>('checkbox', { name: /SRC-1/ }).disabled).toBe(false);
    expect(screen.getByTestId('meter-brief').textContent).toContain('max input 2 W (33.0 dBm)');
  });

  it('judges a point live as readings are typed and saves the draft', async () => {
    const bench = await openForm();
    fillConditions();
    const box = (dir: 'up' | 'down', k: number) =>
      screen.getByLabelText(`point 2 (10 GHz), ${dir} reading ${k} in GHz`);
    type(box('up', 1), '10.0031');
    type(box('up', 2), '10.0029');
    type(box('down', 1), '10.0036');
    type(box('down', 2), '10.0034');
    const verdict = await screen.findByTestId('live-verdict', {}, { timeout: 3000 });
    expect(verdict.textContent).toContain('Pass');
    expect(screen.getByTestId('live-error').textContent).toBe('+325.0 ppm');
    const budget = bench.calls.filter((c) => c.op === 'evaluateBudget').at(-1)?.args[0];
    expect(budget).toMatchObject({
      format: 'dipledger.budget/1',
      meter: 'WM-003',
      standard: 'SRC-1',
      reference: '10 GHz',
      conditions: { temperatureC: 21.5, pressureHpa: 1009, humidityPct: 44 },
    });
    await waitFor(() => expect(screen.getByTestId('draft-status').textContent).toContain('Draft 1 saved'), {
      timeout: 3000,
    });
    const saved = bench.drafts.get(1)!.document as { points: { readings: { value: string }[] }[] };
    expect(saved.points[1]!.readings.map((r) => r.value)).toEqual([
      '10.0031 GHz',
      '10.0029 GHz',
      '10.0036 GHz',
      '10.0034 GHz',
    ]);
    // The untouched points are kept in the draft as empty boxes.
    expect(saved.points[0]!.readings.map((r) => r.value)).toEqual(['', '', '', '']);
  });

  it('names a reading the service refuses, beside the point', async () => {
    await openForm();
    fillConditions();
    type(screen.getByLabelText('point 1 (8.5 GHz), up reading 1 in GHz'), '7.9');
    type(screen.getByLabelText('point 1 (8.5 GHz), down reading 1 in GHz'), '8.5');
    const problems = await screen.findByRole('list', { name: 'Problems with points' }, { timeout: 3000 });
    expect(problems.textContent).toContain('Point 1 (8.5 GHz): readings[0].value');
  });

  it('records the check without empty boxes, drops the draft and opens the check to sign it', async () => {
    const bench = await openForm();
    fillConditions();
    type(screen.getByLabelText('point 1 (8.5 GHz), up reading 1 in GHz'), '8.501');
    type(screen.getByLabelText('point 1 (8.5 GHz), down reading 1 in GHz'), '8.502');
    fireEvent.click(screen.getAllByRole('button', { name: /Remove point [23]/ })[0]!);
    fireEvent.click(screen.getByRole('button', { name: /Remove point 2/ }));
    await waitFor(() => expect(screen.getByTestId('draft-status').textContent).toContain('Draft 1 saved'), {
      timeout: 3000,
    });
    fireEvent.click(screen.getByRole('button', { name: 'Record the check' }));
    await waitFor(() => expect(window.location.hash).toBe('#/check/40'));
    const doc = bench.calls.find((c) => c.op === 'recordCheck')?.args[0] as Record<string, unknown>;
    expect(doc).toMatchObject({
      format: 'dipledger.check/1',
      meter: 'WM-003',
      performer: 'Tess Quarry',
      standards: ['SRC-1'],
      conditions: { temperatureC: 21.5, pressureHpa: 1009, humidityPct: 44 },
      points: [
        {
          phase: 'as-found',
          reference: '8.5 GHz',
          readings: [
            { value: '8.501 GHz', direction: 'up' },
            { value: '8.502 GHz', direction: 'down' },
          ],
        },
      ],
    });
    expect(bench.calls.some((c) => c.op === 'discardDraft' && c.args[0] === 1)).toBe(true);
  });

  it('lists every problem when the service refuses, and keeps the draft', async () => {
    const bench = fakeBench({
      recordCheck: () =>
        Promise.reject(
          LabError.invalid([
            {
              field: 'points[0].readings',
              value: [],
              expected: 'at least two readings',
              message: 'points[0].readings: expected at least two readings per point',
            },
            {
              field: 'performer',
              value: '',
              expected: "the performer's name",
              message: "performer: missing; expected the performer's name",
            },
          ]),
        ),
    });
    render(
      <LabProvider api={bench.api}>
        <RecordCheckPage assetId="WM-003" />
      </LabProvider>,
    );
    await screen.findByTestId('meter-brief');
    fireEvent.click(screen.getByRole('button', { name: 'Record the check' }));
    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toContain('Not recorded; nothing was written.');
    expect(alert.textContent).toContain('Point 1.readings: expected at least two readings per point');
    expect(alert.textContent).toContain("performer: missing; expected the performer's name");
    expect(bench.calls.some((c) => c.op === 'discardDraft')).toBe(false);
  });

  it('reopens a draft exactly as it was typed', async () => {
    const bench = fakeBench();
    await bench.api.saveDraft({
      document: {
        format: 'dipledger.check/1',
        meter: 'WM-003',
        date: '2026-11-30',
        performer: 'Omar Vell',
        standards: ['SRC-1'],
        conditions: { temperatureC: 22, pressureHpa: 1001, humidityPct: 40 },
        points: [
          {
            phase: 'as-found',
            reference: '9.3 GHz',
            readings: [
              { value: '9.3004 GHz', direction: 'up' },
              { value: '9300.2 MHz', direction: 'down' },
            ],
          },
        ],
      },
    });
    render(
      <LabProvider api={bench.api}>
        <RecordCheckPage draftId={1} />
      </LabProvider>,
    );
    const up = await screen.findByLabelText<HTMLInputElement>('point 1 (9.3 GHz), up reading 1 in GHz');
    expect(up.value).toBe('9.3004');
    expect(screen.getByLabelText<HTMLInputElement>('point 1 (9.3 GHz), down reading 1 in GHz').value).toBe(
      '9300.2 MHz',
    );
    expect(screen.getByLabelText<HTMLInputElement>('Temperature / °C').value).toBe('22');
    expect(screen.getByLabelText<HTMLInputElement>('Date of the check (YYYY-MM-DD)').value).toBe(
      '2026-11-30',
    );
    expect(screen.getByTestId('draft-status').textContent).toContain('Draft 1 saved');
  });
});

describe('the check form and its document', () => {
  it('round-trips every box through the exchange document', () => {
    const form = {
      ...emptyForm('2026-12-01'),
      meter: 'WM-003',
      performer: 'Tess Quarry',
      standards: ['SRC-1', 'CTR-1'],
      temperatureC: '21.5',
      pressureHpa: 'about 1009',
      humidityPct: '',
      adjusted: true,
      points: [
        {
          phase: 'as-found' as const,
          reference: '10 GHz',
          standard: 'CTR-1',
          up: ['10.001', ''],
          down: ['10002 MHz', '10.003'],
          dipDepthDb: '3.5',
        },
        {
          phase: 'as-left' as const,
          reference: '10 GHz',
          standard: '',
          up: ['', ''],
          down: ['', ''],
          dipDepthDb: '',
        },
      ],
    };
    expect(fromDocument(toDocument(form, 'GHz', 'draft'), 'GHz', '2000-01-01')).toEqual(form);
    const rec = toDocument(form, 'GHz', 'record') as {
      points: { readings: unknown[] }[];
      conditions: unknown;
    };
    expect(rec.points[0]!.readings).toEqual([
      { value: '10.001 GHz', direction: 'up' },
      { value: '10002 MHz', direction: 'down' },
      { value: '10.003 GHz', direction: 'down' },
    ]);
    // A number that is not one goes as typed, for the service to refuse by name.
    expect(rec.conditions).toEqual({ temperatureC: 21.5, pressureHpa: 'about 1009' });
    expect(readingValue(' 12.5 ', 'div')).toBe('12.5 div');
  });

  it('says why a standard is unavailable on a date', () => {
    const [ok, old] = BENCH_STANDARDS;
    expect(availabilityOn(ok!, '2026-12-01').available).toBe(true);
    expect(availabilityOn(ok!, '2025-01-01').reason).toBe('not calibrated until 2025-06-01');
    expect(availabilityOn(old!, '2026-12-01').reason).toBe('certificate FX-2019-4 expired on 2020-03-01');
  });
});

describe('lab standards and settings', () => {
  it('lists standards with due dates in days and expired ones in words', async () => {
    render(
      <LabProvider api={fakeBench().api}>
        <StandardsPage />
      </LabProvider>,
    );
    const old = (await screen.findByText('SRC-OLD')).closest('tr')!;
    expect(old.textContent).toContain('2020-03-01');
    expect(old.textContent).toContain('2100 d overdue, expired');
    expect(old.textContent).toContain('0.05 ppm (2)');
    fireEvent.click(within(old).getByRole('button', { name: '1 certificates' }));
    expect(await screen.findByText('FX-2019-4', { selector: '.history td' })).toBeTruthy();
  });

  it('saves settings, keeping the ones it does not show, and names a refused field', async () => {
    const bench = fakeBench();
    render(
      <LabProvider api={bench.api}>
        <SettingsPage />
      </LabProvider>,
    );
    type(await screen.findByLabelText('Reliability target / %'), '90');
    fireEvent.click(screen.getByRole('radio', { name: /Non-binary/ }));
    fireEvent.click(screen.getByRole('button', { name: 'Save the settings' }));
    await screen.findByText('✓ Saved.');
    const sent = bench.calls.find((c) => c.op === 'updateLab')?.args[0] as Record<string, unknown>;
    expect(sent).toMatchObject({
      reliabilityTarget: 0.9,
      decisionRule: { kind: 'non-binary' },
      intervalMaxMonths: 60,
    });
    // Fields other work adds to the settings travel back unchanged.
    for (const [k, v] of Object.entries(bench.lab)) expect(sent[k]).toEqual(v);

    cleanup();
    const refusing = fakeBench({
      updateLab: () =>
        Promise.reject(LabError.field('intervalMinMonths', 48, 'at most intervalMaxMonths (36)')),
    });
    render(
      <LabProvider api={refusing.api}>
        <SettingsPage />
      </LabProvider>,
    );
    fireEvent.click(await screen.findByRole('button', { name: 'Save the settings' }));
    expect((await screen.findByRole('alert')).textContent).toContain(
      'Shortest interval (months): 48 is not valid; expected at most Longest interval (months) (36)',
    );
  });
});

describe('fit for use', () => {
  it('asks at the typed frequency, says yes or no in words, and details the chosen meter', async () => {
    const asked: unknown[] = [];
    const { api } = fakeBench({
      fitForUse: (query) => {
        asked.push(query);
        return Promise.resolve({
          frequencyHz: 9.375e9,
          asOf: '2026-12-01',
          notes: [],
          answers: [
            {
              assetId: 'WM-003',
              description: 'X-band waveguide meter',
              frequencyHz: 9.375e9,
              fit: true,
              reasons: [],
              correction: {
                correctionHz: -338_882,
                correctionPpm: -36.15,
                uHz: 162_000,
                uPpm: 17.32,
                fromCheckDate: '2025-01-15',
                basis: 'interpolated between 9.3 GHz and 10 GHz',
              },
              uncertainty: {
                combinedHz: 229_000,
                expandedHz: 458_686,
                expandedPpm: 48.9,
                coverageFactor: 2,
                lines: [{ label: 'correction from the last check', uPpm: 17.27 }],
              },
              dueDate: '2026-01-15',
              daysToDue: 45,
              warnings: [],
            },
            {
              assetId: 'WM-009',
              description: 'Spare',
              frequencyHz: 9.375e9,
              fit: false,
              reasons: [{ code: 'withdrawn', message: 'WM-009 is withdrawn from use.' }],
              correction: null,
              uncertainty: null,
              dueDate: null,
              daysToDue: null,
              warnings: [],
            },
          ],
        });
      },
    });
    window.location.hash = '#/use';
    render(<App api={api} />);
    type(await screen.findByLabelText('Frequency, with its unit'), ' 9.375 GHz ');
    fireEvent.click(screen.getByRole('button', { name: 'Ask' }));
    const yes = (await screen.findByRole('link', { name: 'WM-003' })).closest('tr')!;
    expect(asked).toEqual([{ frequency: '9.375 GHz' }]);
    expect(yes.textContent).toContain('✓ Yes');
    expect(yes.textContent).toContain('−36.1 ppm');
    expect(yes.textContent).toContain('±48.9 ppm (2.00)');
    const no = screen.getByRole('link', { name: 'WM-009' }).closest('tr')!;
    expect(no.textContent).toContain('✗ No');
    expect(no.textContent).toContain('WM-009 is withdrawn from use.');
    // The first meter that may be used is detailed at once.
    expect(screen.getByTestId('use-correction').textContent).toContain('Add −36.15 ppm (−338.882 kHz');
  });

  it('shows a refused frequency as the service words it', async () => {
    const { api } = fakeBench({
      fitForUse: () =>
        Promise.reject(LabError.field('frequency', '9.3', 'a frequency with its unit, such as "9.3 GHz"')),
    });
    window.location.hash = '#/use';
    render(<App api={api} />);
    type(await screen.findByLabelText('Frequency, with its unit'), '9.3');
    fireEvent.click(screen.getByRole('button', { name: 'Ask' }));
    expect((await screen.findByRole('alert')).textContent).toContain('frequency: "9.3" is not valid');
  });
});
