// @vitest-environment happy-dom
// The register view in happy-dom against a fake client: rows sorted soonest due first, each
// filter (text, state, due status, construction, a frequency to cover, flagged only) with its
// count, column sorting with aria-sort, a windowed body for a fleet of 2,000 meters, the
// coverage strip drawn from the service's `coverage` answer, load failures, and the formatting
// rules (units always written, words beside symbols).
import { act, cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { CoverageStrip } from '../../renderer/src/register/CoverageStrip';
import { RegisterPage } from '../../renderer/src/register/RegisterPage';
import { logPosition, packLanes, stripSegments } from '../../renderer/src/register/coverage';
import { dueStatus, formatBand, formatDays } from '../../renderer/src/shared/format';
import {
  DEFAULT_SORT,
  NO_FILTERS,
  filterRows,
  parseCoverFrequency,
  sortRows,
} from '../../renderer/src/register/registerFilters';
import { DEMO_COVERAGE, DEMO_LAB, DEMO_ROWS, fakeLabApi } from '../e2e/fixtures/fakeLab';
import { fleetApi, fleetAssetId } from '../e2e/fixtures/registerFleet';
import { LabProvider } from '../../renderer/src/lab/LabContext';

afterEach(cleanup);

const bodyRows = () => screen.getAllByRole('row').filter((r) => r.hasAttribute('data-asset-id'));
const ids = () => bodyRows().map((r) => r.getAttribute('data-asset-id'));
const count = () => screen.getByTestId('register-count').textContent ?? '';
const header = (name: string) => screen.getByRole('columnheader', { name });

/** Soonest due first: never checked, then overdue, soon, later; withdrawn last. */
const DUE_ORDER = ['WM-005', 'WM-003', 'WM-004', 'WM-002', 'WM-001', 'WM-006', 'WM-007'];

async function openRegister(api: LabApi = fakeLabApi()) {
  render(
    <LabProvider api={api}>
      <RegisterPage />
    </LabProvider>,
  );
  await screen.findByRole('heading', { level: 1, name: DEMO_LAB.name });
  // The flags and the coverage arrive on their own.
  await screen.findByTestId('coverage-gaps');
  await waitFor(() => expect(screen.queryByText('(flags loading)')).toBeNull());
}

async function change(label: string, value: string) {
  await act(async () => {
    fireEvent.change(screen.getByLabelText(label), { target: { value } });
    await Promise.resolve();
  });
}

describe('RegisterPage', () => {
  it('shows the lab, the cautions and one row per meter, soonest due first', async () => {
    await openRegister();
    expect(screen.getByRole('complementary', { name: 'Cautions' }).textContent).toContain(
      'Maximum input power',
    );
    expect(ids()).toEqual(DUE_ORDER);
    expect(header('Due date').getAttribute('aria-sort')).toBe('ascending');
    expect(header('Asset id').hasAttribute('aria-sort')).toBe(false);
    const overdue = bodyRows().find((r) => r.getAttribute('data-asset-id') === 'WM-003')!;
    expect(within(overdue).getByText(/21 d overdue/)).toBeTruthy();
    expect(count()).toBe('7 meters2 overdue1 due within 30 d');
  });

  it('shows drift and health flags from the due list, in words with a symbol', async () => {
    await openRegister();
    const row = (id: string) => bodyRows().find((r) => r.getAttribute('data-asset-id') === id)!;
    expect(row('WM-006').querySelector('.flags-cell')?.textContent).toBe('⚑ dip fading⚑ Q falling');
    expect(row('WM-001').querySelector('.flags-cell')?.textContent).toBe('none');
    // Withdrawn meters are not on the due list: no flags to show, and none claimed.
    expect(row('WM-007').querySelector('.flags-cell')?.textContent).toBe('—');
  });

  it('filters as the user types', async () => {
    await openRegister();
    await change('Find a meter', 'WM-006');
    expect(ids()).toEqual(['WM-006']);
    expect(count()).toContain('Showing 1 of 7 meters');
    await change('Find a meter', 'no such meter');
    expect(ids()).toEqual([]);
    expect(screen.getByText('No meter matches “no such meter”.')).toBeTruthy();
  });

  it('filters by state, using the state words of the app', async () => {
    await openRegister();
    const states = [...screen.getByLabelText<HTMLSelectElement>('State').options].map((o) => o.text);
    expect(states).toEqual(['Any state', '● In service', '◆ Quarantined', '○ Withdrawn']);
    await change('State', 'quarantined');
    expect(ids()).toEqual(['WM-004']);
    await change('State', 'in-service');
    expect(ids()).toEqual(['WM-005', 'WM-003', 'WM-002', 'WM-001', 'WM-006']);
    expect(count()).toContain('Showing 5 of 7 meters');
  });

  it('filters by due status; a withdrawn meter is never overdue', async () => {
    await openRegister();
    await change('Due', 'overdue');
    expect(ids()).toEqual(['WM-003', 'WM-004']);
    await change('Due', 'soon');
    expect(ids()).toEqual(['WM-002']);
    await change('Due', 'later');
    expect(ids()).toEqual(['WM-001', 'WM-006']);
    await change('Due', 'none');
    expect(ids()).toEqual(['WM-005', 'WM-007']);
  });

  it('filters by construction', async () => {
    await openRegister();
    await change('Construction', 'coaxial');
    expect(ids()).toEqual(['WM-002', 'WM-001']);
    await change('Construction', 'waveguide');
    expect(ids()).toHaveLength(5);
  });

  it('filters by a frequency the meter must cover, typed with its unit', async () => {
    await openRegister();
    await change('Covers frequency', '10 GHz');
    expect(ids()).toEqual(['WM-003']);
    // A band edge belongs to both meters that meet there.
    await change('Covers frequency', '12400 MHz');
    expect(ids()).toEqual(['WM-003', 'WM-004']);
    await change('Covers frequency', '95e9');
    expect(ids()).toEqual(['WM-007']);
    // No unit: refused in the engine's words, named beside the box, and not applied.
    await change('Covers frequency', '9.3');
    const box = screen.getByLabelText('Covers frequency');
    expect(box.getAttribute('aria-invalid')).toBe('true');
    const problem = document.getElementById(box.getAttribute('aria-describedby') ?? '')!;
    expect(problem.textContent).toContain('Frequency not applied: frequency: "9.3" has no unit');
    expect(ids()).toHaveLength(7);
    await change('Covers frequency', '5 GHz');
    expect(ids()).toEqual([]);
    expect(screen.getByText('No meter matches these filters.')).toBeTruthy();
  });

  it('shows only flagged meters when asked, and clears every filter at once', async () => {
    await openRegister();
    const clear = screen.getByRole<HTMLButtonElement>('button', { name: 'Clear filters' });
    expect(clear.disabled).toBe(true);
    await act(async () => {
      fireEvent.click(screen.getByLabelText(/Only meters with a drift or health flag/));
      await Promise.resolve();
    });
    expect(ids()).toEqual(['WM-003', 'WM-006']);
    await change('Construction', 'waveguide');
    await change('Due', 'overdue');
    expect(ids()).toEqual(['WM-003']);
    expect(count()).toContain('Showing 1 of 7 meters');
    expect(clear.disabled).toBe(false);
    await act(async () => {
      fireEvent.click(clear);
      await Promise.resolve();
    });
    expect(ids()).toEqual(DUE_ORDER);
    expect(screen.getByLabelText<HTMLInputElement>(/Only meters with a drift/).checked).toBe(false);
    expect(count()).toContain('7 meters');
  });

  it('sorts by a column on a click, the other way on a second click, with aria-sort', async () => {
    await openRegister();
    const sortBy = async (name: string) => {
      await act(async () => {
        fireEvent.click(within(header(name)).getByRole('button'));
        await Promise.resolve();
      });
    };
    await sortBy('Asset id');
    expect(ids()).toEqual([...DEMO_ROWS.map((r) => r.assetId)].sort());
    expect(header('Asset id').getAttribute('aria-sort')).toBe('ascending');
    expect(header('Due date').hasAttribute('aria-sort')).toBe(false);
    await sortBy('Asset id');
    expect(ids()).toEqual([...DEMO_ROWS.map((r) => r.assetId)].sort().reverse());
    expect(header('Asset id').getAttribute('aria-sort')).toBe('descending');
    await sortBy('Last verdict');
    // Not checked, pass (by id), conditional pass, conditional fail, fail.
    expect(ids()).toEqual(['WM-005', 'WM-001', 'WM-003', 'WM-007', 'WM-002', 'WM-006', 'WM-004']);
    await sortBy('Days to due');
    expect(ids()).toEqual(DUE_ORDER);
    expect(header('Due date').getAttribute('aria-sort')).toBe('ascending');
  });

  it('mounts only a window of rows for 2,000 meters, and scrolling brings later ones', async () => {
    render(
      <LabProvider api={fleetApi(2000)}>
        <RegisterPage />
      </LabProvider>,
    );
    await screen.findByRole('heading', { level: 1, name: DEMO_LAB.name });
    const table = screen.getByRole('table');
    expect(table.getAttribute('aria-rowcount')).toBe('2001');
    const mounted = bodyRows();
    expect(mounted.length).toBeGreaterThan(10);
    expect(mounted.length).toBeLessThan(60);
    expect(mounted[0]!.getAttribute('aria-rowindex')).toBe('2');
    expect(count()).toContain('2000 meters');
    const firstId = mounted[0]!.getAttribute('data-asset-id');

    const scroller = screen.getByTestId('register-scroll');
    await act(async () => {
      scroller.scrollTop = 1000 * 37;
      fireEvent.scroll(scroller);
      await new Promise((r) => setTimeout(r, 20));
    });
    await waitFor(() => expect(ids()).not.toContain(firstId));
    const indexes = bodyRows().map((r) => Number(r.getAttribute('aria-rowindex')));
    expect(Math.min(...indexes)).toBeGreaterThan(950);
    expect(Math.max(...indexes)).toBeLessThan(1080);
    expect(bodyRows().length).toBeLessThan(60);

    // A filter narrows the whole fleet, not only the window.
    await change('Find a meter', fleetAssetId(1999));
    await waitFor(() => expect(ids()).toEqual([fleetAssetId(1999)]));
    expect(table.getAttribute('aria-rowcount')).toBe('2');
    expect(count()).toContain('Showing 1 of 2000 meters');
  });

  it('draws the coverage strip from the service’s coverage answer', async () => {
    const coverage = vi.fn(() => Promise.resolve(structuredClone(DEMO_COVERAGE)));
    await openRegister(fakeLabApi({ coverage }));
    expect(coverage).toHaveBeenCalledTimes(1);
    const text = screen.getByTestId('coverage-gaps').textContent ?? '';
    expect(text).toContain('4 gaps: 2–2.6 GHz, 3.95–8.2 GHz, 18–26.5 GHz, 40–50 GHz.');
    // An overdue or never-checked meter does not cover its band, as the service says.
    expect(text).toContain(
      'Not usable now: 8.2–18 GHz (WM-003 overdue, WM-004 quarantined), 26.5–40 GHz (WM-005 never checked), 75–110 GHz (WM-007 withdrawn).',
    );
    expect(document.querySelectorAll('.coverage .seg-gap')).toHaveLength(4);
    expect(document.querySelectorAll('.coverage .seg-unusable')).toHaveLength(3);
    expect(screen.getByText('frequency / GHz (logarithmic)')).toBeTruthy();
    expect(screen.getByRole('heading', { level: 2 }).textContent).toContain('as of 2025-12-01');
  });

  it('says why the register could not be loaded', async () => {
    const api = fakeLabApi({
      listMeters: () => Promise.reject(new LabError('internal', 'the lab file is locked')),
    });
    render(
      <LabProvider api={api}>
        <RegisterPage />
      </LabProvider>,
    );
    expect((await screen.findByRole('alert')).textContent).toContain('the lab file is locked');
  });

  it('keeps the table when the flags or the coverage cannot be loaded, and says so', async () => {
    const api = fakeLabApi({
      listRegister: () => Promise.reject(new LabError('internal', 'analysis failed')),
      coverage: () => Promise.reject(new LabError('internal', 'coverage failed')),
    });
    render(
      <LabProvider api={api}>
        <RegisterPage />
      </LabProvider>,
    );
    await waitFor(() => expect(screen.getAllByRole('alert')).toHaveLength(2));
    const alerts = screen.getAllByRole('alert').map((a) => a.textContent);
    expect(alerts).toContain('Drift and health flags could not be loaded: analysis failed');
    expect(alerts).toContain('The band coverage could not be loaded: coverage failed');
    expect(ids()).toEqual(DUE_ORDER);
  });
});

describe('band coverage', () => {
  it('turns the service’s segments into covered, not usable and gap stretches', () => {
    const segs = stripSegments(DEMO_COVERAGE).map((s) => [
      s.fromHz / 1e9,
      s.toHz / 1e9,
      s.kind,
      s.meters.join(' '),
    ]);
    expect(segs).toEqual([
      [1, 2, 'usable', 'WM-001'],
      [2, 2.6, 'gap', ''],
      [2.6, 3.95, 'usable', 'WM-002'],
      [3.95, 8.2, 'gap', ''],
      [8.2, 18, 'unusable', 'WM-003 WM-004'],
      [18, 26.5, 'gap', ''],
      [26.5, 40, 'unusable', 'WM-005'],
      [40, 50, 'gap', ''],
      [50, 75, 'usable', 'WM-006'],
      [75, 110, 'unusable', 'WM-007'],
    ]);
    // A log axis: 10 GHz sits where log(10)/log(110) puts it, about 49 % of the way.
    expect(logPosition(10e9)).toBeCloseTo(Math.log(10) / Math.log(110), 12);
    expect(logPosition(0.5e9)).toBe(0);
    expect(
      packLanes([
        { minHz: 1, maxHz: 3 },
        { minHz: 2, maxHz: 4 },
        { minHz: 3, maxHz: 5 },
      ]),
    ).toHaveLength(2);
  });

  it('says there are no gaps when every stretch is covered', () => {
    const full = {
      ...DEMO_COVERAGE,
      segments: [{ fromHz: 1e9, toHz: 110e9, meters: ['WM-001'], usable: ['WM-001'], gap: false, note: '' }],
      gaps: [],
    };
    render(<CoverageStrip report={full} rows={DEMO_ROWS} />);
    expect(screen.getByTestId('coverage-gaps').textContent).toBe(
      '✓ No gaps: every frequency from 1 to 110 GHz has a meter.',
    );
    expect(document.querySelectorAll('.seg-usable')).toHaveLength(1);
  });
});

describe('register filtering and sorting', () => {
  it('matches asset ids and descriptions without regard to case', () => {
    expect(filterRows(DEMO_ROWS, '  KA-BAND ').map((r) => r.assetId)).toEqual(['WM-005']);
    expect(filterRows(DEMO_ROWS, 'wm-00')).toHaveLength(DEMO_ROWS.length);
    expect(filterRows(DEMO_ROWS, '')).toBe(DEMO_ROWS);
    expect(filterRows(DEMO_ROWS, NO_FILTERS)).toBe(DEMO_ROWS);
  });

  it('reads a frequency with the engine’s unit parser', () => {
    expect(parseCoverFrequency(' 9.3 GHz ')).toEqual({ kind: 'ok', hz: 9.3e9 });
    expect(parseCoverFrequency('9300MHz')).toEqual({ kind: 'ok', hz: 9.3e9 });
    expect(parseCoverFrequency('')).toEqual({ kind: 'none' });
    const comma = parseCoverFrequency('9,3 GHz');
    expect(comma.kind === 'bad' && comma.message).toContain('decimal comma');
  });

  it('sorts without changing its input, ties by asset id', () => {
    const input = [...DEMO_ROWS].reverse();
    const sorted = sortRows(input, DEFAULT_SORT);
    expect(sorted.map((r) => r.assetId)).toEqual(DUE_ORDER);
    expect(input[0]!.assetId).toBe('WM-007');
    const byBand = sortRows(DEMO_ROWS, { key: 'band', dir: 'descending' }).map((r) => r.assetId);
    expect(byBand).toEqual(['WM-007', 'WM-006', 'WM-005', 'WM-004', 'WM-003', 'WM-002', 'WM-001']);
  });
});

describe('register formatting', () => {
  it('writes bands in one unit with an en dash', () => {
    expect(formatBand(8.2e9, 12.4e9)).toBe('8.2–12.4 GHz');
    expect(formatBand(75e9, 110e9)).toBe('75–110 GHz');
    expect(formatBand(500e6, 1.5e9)).toBe('0.5–1.5 GHz');
    expect(formatBand(200e6, 950e6)).toBe('200–950 MHz');
  });

  it('always writes days with their unit and says overdue and soon in words', () => {
    expect(formatDays(90)).toBe('90 d');
    expect(formatDays(12)).toBe('12 d, soon');
    expect(formatDays(0)).toBe('0 d, due today');
    expect(formatDays(-21)).toBe('21 d overdue');
    expect(formatDays(null)).toBe('—');
    expect(dueStatus(-1)).toBe('overdue');
  });
});
