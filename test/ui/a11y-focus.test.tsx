// @vitest-environment happy-dom
// Focus and announcements in happy-dom against a fake LabApi: the skip link comes first and the
// view sits in one main region; a change of view moves focus to its heading; the polite live
// region says each message (twice when said twice); a refusal marks the fields it names
// (aria-invalid, aria-describedby to its message) and focuses the first in the order of the form.
// What is checked is WAI-ARIA 1.2 and WCAG 2.1 (2.4.1 bypass blocks, 2.4.3 focus order, 3.3.1
// error identification, 4.1.3 status messages), as common practice reads them.
import { act, cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { App } from '../../renderer/src/App';
import { RecordCheckPage } from '../../renderer/src/record/RecordCheckPage';
import { LabProvider } from '../../renderer/src/lab/LabContext';
import { AnnounceProvider, controlFor, markProblems, useAnnounce } from '../../renderer/src/shared/a11y';
import { LabError } from '../../app/api/errors';
import { fakeBench } from '../e2e/fixtures/fakeBench';

afterEach(cleanup);
beforeEach(() => {
  window.location.hash = '';
  document.body.innerHTML = '';
});

const go = async (hash: string) =>
  act(async () => {
    window.location.hash = hash;
    window.dispatchEvent(new HashChangeEvent('hashchange'));
    await Promise.resolve();
  });

describe('the window shell', () => {
  it('puts the skip link first and the view in one main region', async () => {
    window.location.hash = '#/standards';
    render(<App api={fakeBench().api} />);
    await screen.findByRole('heading', { level: 1, name: 'Lab standards' });
    const focusable = document.querySelectorAll('a[href], button, input, select');
    expect(focusable[0]?.textContent).toBe('Skip to main content');
    expect(document.querySelectorAll('main')).toHaveLength(1);
    expect(document.querySelector('main h1')?.textContent).toBe('Lab standards');
    // Skipping moves focus to the view's heading and leaves the address (the route) alone.
    fireEvent.click(screen.getByRole('link', { name: 'Skip to main content' }));
    expect(document.activeElement?.textContent).toBe('Lab standards');
    expect(window.location.hash).toBe('#/standards');
  });

  it('moves focus to the new view’s heading on a change of view, not on the first load', async () => {
    window.location.hash = '#/standards';
    render(<App api={fakeBench().api} />);
    await screen.findByRole('heading', { level: 1, name: 'Lab standards' });
    expect(document.activeElement).toBe(document.body);
    // As after following a link of the navigation bar: focus leaves the bar for the view.
    screen.getByRole('link', { name: 'Settings' }).focus();
    await go('#/settings');
    const h1 = await screen.findByRole('heading', { level: 1, name: 'Settings' });
    await waitFor(() => expect(document.activeElement).toBe(h1));
    expect(h1.closest('main')).not.toBeNull();
    expect(h1.getAttribute('tabindex')).toBe('-1');
  });
});

function Speaker({ text }: { text: string }) {
  const announce = useAnnounce();
  return (
    <button type="button" onClick={() => announce(text)}>
      say
    </button>
  );
}

describe('the polite live region', () => {
  it('says each message, and the same words again as a new node', () => {
    render(
      <AnnounceProvider>
        <Speaker text="Check 166 recorded" />
      </AnnounceProvider>,
    );
    const region = screen.getByTestId('announcer');
    expect(region.getAttribute('aria-live')).toBe('polite');
    expect(region.getAttribute('role')).toBe('status');
    expect(region.textContent).toBe('');
    fireEvent.click(screen.getByRole('button', { name: 'say' }));
    const first = region.firstElementChild;
    expect(region.textContent).toBe('Check 166 recorded');
    fireEvent.click(screen.getByRole('button', { name: 'say' }));
    expect(region.textContent).toBe('Check 166 recorded');
    expect(region.firstElementChild).not.toBe(first);
  });
});

describe('marking the fields a refusal names', () => {
  const form = () => {
    document.body.innerHTML = `
      <form id="f">
        <select data-field="meter"></select>
        <input data-field="date" aria-describedby="hint" />
        <input data-field="points[1].readings" />
        <input data-field="points[1].dipDepthDb" />
        <p id="m0">bad date</p><p id="m1">few readings</p><p id="all">refused</p>
      </form>`;
    return document.getElementById('f')!;
  };

  it('finds the control of a path or of its nearest prefix', () => {
    const root = form();
    expect(controlFor(root, 'points[1].readings[0].value')?.dataset.field).toBe('points[1].readings');
    expect(controlFor(root, 'date')?.dataset.field).toBe('date');
    expect(controlFor(root, 'standards')).toBeNull();
  });

  it('marks each field, points it at its message, focuses the first in form order, and undoes', () => {
    const root = form();
    // Listed out of order: the date comes first on the form.
    const undo = markProblems(root, [
      { field: 'points[1].readings[0].value', messageId: 'm1' },
      { field: 'date', messageId: 'm0' },
    ]);
    const date = controlFor(root, 'date')!;
    const readings = controlFor(root, 'points[1].readings')!;
    expect(date.getAttribute('aria-invalid')).toBe('true');
    expect(date.getAttribute('aria-describedby')).toBe('hint m0');
    expect(readings.getAttribute('aria-describedby')).toBe('m1');
    expect(controlFor(root, 'meter')!.hasAttribute('aria-invalid')).toBe(false);
    expect(document.activeElement).toBe(date);
    undo();
    expect(date.hasAttribute('aria-invalid')).toBe(false);
    expect(date.getAttribute('aria-describedby')).toBe('hint');
    expect(readings.hasAttribute('aria-describedby')).toBe(false);
  });

  it('focuses the message when no named field is on the form', () => {
    const root = form();
    markProblems(root, [{ field: 'standards', messageId: 'm0' }], document.getElementById('all'));
    expect(document.activeElement?.id).toBe('all');
  });

  it('on a refused check, marks the named fields and focuses the first; the button keeps focus while busy', async () => {
    let refuse: (e: unknown) => void = () => undefined;
    const bench = fakeBench({
      recordCheck: () =>
        new Promise((_, reject) => {
          refuse = reject;
        }),
    });
    render(
      <LabProvider api={bench.api}>
        <AnnounceProvider>
          <RecordCheckPage assetId="WM-003" />
        </AnnounceProvider>
      </LabProvider>,
    );
    await screen.findByTestId('meter-brief');
    const button = screen.getByRole('button', { name: 'Record the check' });
    button.focus();
    fireEvent.click(button);
    const busy = await screen.findByRole('button', { name: 'Recording…' });
    expect(busy).toBe(button);
    expect(busy.hasAttribute('disabled')).toBe(false);
    expect(busy.getAttribute('aria-disabled')).toBe('true');
    expect(document.activeElement).toBe(busy);
    await act(async () => {
      refuse(
        LabError.invalid([
          {
            field: 'points[0].readings',
            value: [],
            expected: 'at least two readings',
            message: 'points[0].readings: expected at least two readings per point',
          },
          { field: 'performer', value: '', expected: "the performer's name", message: 'performer: missing' },
        ]),
      );
      await Promise.resolve();
    });
    await screen.findByRole('alert');
    const performer = document.querySelector<HTMLElement>('[data-field="performer"]')!;
    const reading = document.querySelector<HTMLElement>('[data-field="points[0].readings"]')!;
    await waitFor(() => expect(document.activeElement).toBe(performer));
    expect(performer.getAttribute('aria-invalid')).toBe('true');
    expect(reading.getAttribute('aria-invalid')).toBe('true');
    const message = document.getElementById(performer.getAttribute('aria-describedby')!.split(' ').at(-1)!);
    expect(message?.textContent).toContain('performer');
  });
});
