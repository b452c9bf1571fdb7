// The register at fleet scale in a DOM (happy-dom, as the view tests use; React 19): 2,000
// synthetic meters (test/e2e/fixtures/registerFleet.ts) behind a fake LabApi. Figures, each
// against a floor measured in the same run or a stated target:
// - first render of the register (load, sort, filters, windowed table, coverage strip), and a
//   filter keystroke applied (input to table), each against a plain non-windowed table of the
//   same rows and cells rendered the same way here (the register must be at least as quick);
// - the same two as rates against a target: first render within 500 ms, a keystroke within
//   100 ms (the usual limit for a response to feel immediate: common practice);
// - rows mounted: 2,000 over the rows in the DOM (a window, not the fleet; target at least 20,
//   i.e. at most 100 rows mounted).
// React runs its production build, as the packaged app does (the development build spends most
// of its time checking and warning), so there is no act(): a figure is the time until the DOM
// shows the result, polled between macrotasks. happy-dom has no layout, so the window is the
// table's no-layout view (about 600 px); in Chromium the e2e test (register.e2e.test.ts) checks
// the window against real scrolling.
import { performance } from 'node:perf_hooks';
import { Window } from 'happy-dom';
import type { BenchFigure } from './run';

const METERS = Number(process.env.DIPLEDGER_BENCH_METERS ?? 2000);
/** Timed runs of each figure; the median is reported, after one warm-up run. */
const RUNS = 7;
const FIRST_RENDER_TARGET_MS = 500;
const KEYSTROKE_TARGET_MS = 100;
const MOUNTED_TARGET = 20;
/** Matches about half the fleet ("unit 1", "unit 10"...), so the table really changes. */
const KEYSTROKE_TEXT = 'unit 1';

const log = (text: string) => process.stderr.write(`register-ui: ${text}\n`);

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
}

/** A DOM in this process: happy-dom's window properties as globals, before React loads (react-dom
 * decides at import whether it has a DOM). */
function installDom(): Window {
  const win = new Window({ url: 'http://localhost/', width: 1280, height: 860 });
  const g = globalThis as Record<string, unknown>;
  for (const key of Object.getOwnPropertyNames(win)) {
    if (key in g) continue;
    g[key] = (win as unknown as Record<string, unknown>)[key];
  }
  g.window = win;
  g.document = win.document;
  process.env.NODE_ENV = 'production';
  return win;
}

/** Waits, a macrotask at a time, until the DOM shows what is asked (at most 30 s). */
async function until(what: string, done: () => boolean): Promise<void> {
  const t = performance.now();
  while (!done()) {
    if (performance.now() - t > 30_000) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setImmediate(r));
  }
}

export async function figures(): Promise<BenchFigure[]> {
  const win = installDom();
  const React = await import('react');
  const { createRoot } = await import('react-dom/client');
  const { RegisterPage } = await import('../../renderer/src/register/RegisterPage');
  const { LabProvider } = await import('../../renderer/src/lab/LabContext');
  const { STATE_LABEL, VERDICT_LABEL, formatBand, formatDays } =
    await import('../../renderer/src/shared/format');
  const { fleetApi, fleetRows } = await import('../e2e/fixtures/registerFleet');
  const h = React.createElement;
  type Row = ReturnType<typeof fleetRows>[number];

  /** The floor: every row mounted, same cells and formatting, no window, no sort, no strip. */
  function PlainRegister({ rows }: { rows: Row[] }) {
    const [text, setText] = React.useState('');
    const q = text.trim().toLowerCase();
    const shown = q ? rows.filter((r) => r.description.toLowerCase().includes(q)) : rows;
    return h(
      'div',
      null,
      h('label', { htmlFor: 'plain-search' }, 'Find a meter'),
      h('input', {
        id: 'plain-search',
        value: text,
        onChange: (e: { target: { value: string } }) => setText(e.target.value),
      }),
      h(
        'table',
        null,
        h(
          'tbody',
          null,
          shown.map((r) =>
            h(
              'tr',
              { key: r.assetId, 'data-asset-id': r.assetId },
              h('th', { scope: 'row' }, h('a', { href: `#/meter/${r.assetId}` }, r.assetId)),
              h('td', null, r.description),
              h('td', null, r.construction),
              h('td', null, formatBand(r.minHz, r.maxHz)),
              h('td', null, `${STATE_LABEL[r.state].symbol} ${STATE_LABEL[r.state].word}`),
              h('td', null, r.lastVerdict ? VERDICT_LABEL[r.lastVerdict].word : 'Not checked yet'),
              h('td', null, r.dueDate ?? '—'),
              h('td', null, formatDays(r.daysToDue)),
              h('td', null, (r.flags ?? []).join(', ') || 'none'),
            ),
          ),
        ),
      ),
    );
  }

  const mountedRows = () => document.querySelectorAll('tr[data-asset-id]').length;
  const countText = () => document.querySelector('[data-testid="register-count"]')?.textContent ?? '';
  let root: ReturnType<typeof createRoot> | null = null;
  let container: HTMLElement | null = null;

  async function firstRender(element: ReturnType<typeof h>, ready: () => boolean): Promise<number> {
    container = document.createElement('div');
    document.body.appendChild(container);
    const t = performance.now();
    root = createRoot(container);
    root.render(element);
    await until('the first render', ready);
    return performance.now() - t;
  }

  /** Types the keystroke's text into a box the way a browser reports it to React (an input event). */
  async function keystroke(id: string, applied: () => boolean): Promise<number> {
    const box = document.getElementById(id) as HTMLInputElement | null;
    if (!box) throw new Error(`no box #${id}`);
    const t = performance.now();
    // Through the prototype's setter, as a browser sets it: React's value tracker then sees a change.
    Reflect.set(win.HTMLInputElement.prototype, 'value', KEYSTROKE_TEXT, box);
    box.dispatchEvent(new win.Event('input', { bubbles: true }) as unknown as Event);
    await until('the filtered table', applied);
    return performance.now() - t;
  }

  function unmount() {
    root?.unmount();
    container?.remove();
  }

  const rows = fleetRows(METERS);
  const register = { first: [] as number[], key: [] as number[], mounted: 0 };
  const plain = { first: [] as number[], key: [] as number[] };
  const expected = rows.filter((r) => r.description.toLowerCase().includes(KEYSTROKE_TEXT)).length;
  for (let run = 0; run <= RUNS; run++) {
    const api = fleetApi(METERS);
    // Ready: rows shown, flags and the coverage strip loaded.
    const f = await firstRender(
      h(LabProvider, { api, children: h(RegisterPage) }),
      () =>
        mountedRows() > 0 &&
        document.querySelector('[data-testid="coverage-gaps"]') !== null &&
        !document.body.textContent?.includes('(flags loading)'),
    );
    register.mounted = mountedRows();
    const k = await keystroke('meter-search', () => countText().startsWith(`Showing ${expected} of`));
    unmount();
    const pf = await firstRender(h(PlainRegister, { rows }), () => mountedRows() === rows.length);
    const pk = await keystroke('plain-search', () => mountedRows() === expected);
    unmount();
    // Run 0 warms the JIT and module caches.
    if (run === 0) continue;
    register.first.push(f);
    register.key.push(k);
    plain.first.push(pf);
    plain.key.push(pk);
  }
  const r = { first: median(register.first), key: median(register.key) };
  const p = { first: median(plain.first), key: median(plain.key) };
  log(
    `${METERS} meters (${expected} match "${KEYSTROKE_TEXT}"): register first render ${r.first.toFixed(1)} ms, keystroke ${r.key.toFixed(1)} ms, ` +
      `${register.mounted} rows mounted; plain table ${p.first.toFixed(1)} ms and ${p.key.toFixed(1)} ms`,
  );

  return [
    {
      name: 'first render, times quicker than a plain table (floor: as quick)',
      value: p.first / r.first,
      floor: 1,
    },
    {
      name: 'filter keystroke, times quicker than a plain table (floor: as quick)',
      value: p.key / r.key,
      floor: 1,
    },
    {
      name: `first render, per second (target ${FIRST_RENDER_TARGET_MS} ms)`,
      value: 1000 / r.first,
      floor: 1000 / FIRST_RENDER_TARGET_MS,
    },
    {
      name: `filter keystroke, per second (target ${KEYSTROKE_TARGET_MS} ms)`,
      value: 1000 / r.key,
      floor: 1000 / KEYSTROKE_TARGET_MS,
    },
    {
      name: `meters per mounted row (target ${MOUNTED_TARGET}: at most ${METERS / MOUNTED_TARGET} rows in the DOM)`,
      value: METERS / register.mounted,
      floor: MOUNTED_TARGET,
    },
  ];
}
