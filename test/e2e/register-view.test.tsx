// @vitest-environment happy-dom
// The register view in happy-dom: rendering from a fake client, filtering, load failure, and
// the formatting rules (units always written, words beside symbols).
import { act, cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { LabError } from '../../app/api/errors';
import { RegisterPage, filterRows } from '../../renderer/src/RegisterPage';
import { dueStatus, formatBand, formatDays } from '../../renderer/src/format';
import { DEMO_LAB, DEMO_ROWS, fakeLabApi } from './fixtures/fakeLab';

afterEach(cleanup);

const bodyRows = () => screen.getAllByRole('row').filter((r) => r.hasAttribute('data-asset-id'));

describe('RegisterPage', () => {
  it('shows the lab, the cautions and one row per meter', async () => {
    render(<RegisterPage api={fakeLabApi()} />);
    expect(await screen.findByRole('heading', { level: 1, name: DEMO_LAB.name })).toBeTruthy();
    expect(screen.getByRole('complementary', { name: 'Cautions' }).textContent).toContain(
      'Maximum input power',
    );
    expect(bodyRows().map((r) => r.getAttribute('data-asset-id'))).toEqual(DEMO_ROWS.map((r) => r.assetId));
    const overdue = bodyRows().find((r) => r.getAttribute('data-asset-id') === 'WM-003')!;
    expect(within(overdue).getByText(/21 d overdue/)).toBeTruthy();
  });

  it('filters as the user types', async () => {
    render(<RegisterPage api={fakeLabApi()} />);
    const search = await screen.findByLabelText('Find a meter');
    await act(async () => {
      fireEvent.change(search, { target: { value: 'WM-006' } });
      await Promise.resolve();
    });
    expect(bodyRows().map((r) => r.getAttribute('data-asset-id'))).toEqual(['WM-006']);
  });

  it('says why the register could not be loaded', async () => {
    const api = fakeLabApi({
      listMeters: () => Promise.reject(new LabError('internal', 'the lab file is locked')),
    });
    render(<RegisterPage api={api} />);
    expect((await screen.findByRole('alert')).textContent).toContain('the lab file is locked');
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

  it('matches asset ids and descriptions without regard to case', () => {
    expect(filterRows(DEMO_ROWS, '  KA-BAND ').map((r) => r.assetId)).toEqual(['WM-005']);
    expect(filterRows(DEMO_ROWS, 'wm-00')).toHaveLength(DEMO_ROWS.length);
    expect(filterRows(DEMO_ROWS, '')).toBe(DEMO_ROWS);
  });
});
