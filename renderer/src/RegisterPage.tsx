// The register: every meter of the lab with its state, last verdict and when it falls due,
// searchable by asset id or description, and the lab's band coverage. Reads through the
// LabApi client only.
import { useDeferredValue, useEffect, useMemo, useState } from 'react';
import type { LabApi, LabSettings, RegisterRow } from '../../app/api/contract';
import { Cautions } from './Cautions';
import { CoverageStrip } from './CoverageStrip';
import { STATE_LABEL, VERDICT_LABEL, dueStatus, formatBand, formatDays, SOON_DAYS } from './format';
import { href } from './routes';

type Load =
  | { kind: 'loading' }
  | { kind: 'failed'; message: string }
  | { kind: 'ready'; lab: LabSettings; rows: RegisterRow[] };

export function RegisterPage({ api }: { api: LabApi }) {
  const [load, setLoad] = useState<Load>({ kind: 'loading' });
  const [query, setQuery] = useState('');
  const deferredQuery = useDeferredValue(query);

  useEffect(() => {
    let live = true;
    Promise.all([api.getLab(), api.listMeters()])
      .then(([lab, rows]) => live && setLoad({ kind: 'ready', lab, rows }))
      .catch(
        (e: unknown) =>
          live && setLoad({ kind: 'failed', message: e instanceof Error ? e.message : String(e) }),
      );
    return () => {
      live = false;
    };
  }, [api]);

  const rows = load.kind === 'ready' ? load.rows : [];
  const shown = useMemo(() => filterRows(rows, deferredQuery), [rows, deferredQuery]);

  useEffect(() => {
    document.title = load.kind === 'ready' ? `${load.lab.name}: register · Dipledger` : 'Dipledger';
  }, [load]);

  return (
    <div className="page">
      <header className="masthead">
        <h1>{load.kind === 'ready' ? load.lab.name : 'Register'}</h1>
        <p className="subtitle">Register of cavity frequency meters</p>
      </header>

      <Cautions />

      <main>
        {load.kind === 'loading' && <p className="status">Loading the register…</p>}
        {load.kind === 'failed' && (
          <p className="status error" role="alert">
            The register could not be loaded: {load.message}
          </p>
        )}
        {load.kind === 'ready' && (
          <>
            <div className="toolbar">
              <label htmlFor="meter-search">Find a meter</label>
              <input
                id="meter-search"
                type="search"
                placeholder="Asset id or description"
                autoComplete="off"
                spellCheck={false}
                value={query}
                onChange={(e) => setQuery(e.target.value)}
              />
              <Summary all={load.rows} shown={shown} />
            </div>
            <RegisterTable rows={shown} query={deferredQuery} />
            <CoverageStrip rows={load.rows} />
          </>
        )}
      </main>

      <footer className="footnote">
        Dates are YYYY-MM-DD. Days to due are counted from today on the lab service’s clock; d = days.
      </footer>
    </div>
  );
}

export function filterRows(rows: RegisterRow[], query: string): RegisterRow[] {
  const q = query.trim().toLowerCase();
  if (!q) return rows;
  return rows.filter((r) => r.assetId.toLowerCase().includes(q) || r.description.toLowerCase().includes(q));
}

/** Withdrawn meters are not used, so their due date is not a warning. */
function effectiveDue(row: RegisterRow) {
  return row.state === 'withdrawn' ? 'none' : dueStatus(row.daysToDue);
}

function Summary({ all, shown }: { all: RegisterRow[]; shown: RegisterRow[] }) {
  const overdue = all.filter((r) => effectiveDue(r) === 'overdue').length;
  const soon = all.filter((r) => ['today', 'soon'].includes(effectiveDue(r))).length;
  const count =
    shown.length === all.length ? `${all.length} meters` : `Showing ${shown.length} of ${all.length} meters`;
  return (
    <p className="summary" aria-live="polite">
      <span>{count}</span>
      <span className={overdue > 0 ? 'tally tally-overdue' : 'tally'}>{overdue} overdue</span>
      <span className="tally">
        {soon} due within {SOON_DAYS} d
      </span>
    </p>
  );
}

function RegisterTable({ rows, query }: { rows: RegisterRow[]; query: string }) {
  return (
    <div className="table-wrap">
      <table className="register">
        <caption className="visually-hidden">Meters in the register</caption>
        <thead>
          <tr>
            <th scope="col">Asset id</th>
            <th scope="col">Description</th>
            <th scope="col">Construction</th>
            <th scope="col" className="num">
              Band
            </th>
            <th scope="col">State</th>
            <th scope="col">Last verdict</th>
            <th scope="col" className="num">
              Due date
            </th>
            <th scope="col" className="num">
              Days to due
            </th>
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => (
            <MeterRow key={row.assetId} row={row} />
          ))}
          {rows.length === 0 && (
            <tr>
              <td colSpan={8} className="empty">
                {query.trim() ? `No meter matches “${query.trim()}”.` : 'The register has no meters yet.'}
              </td>
            </tr>
          )}
        </tbody>
      </table>
    </div>
  );
}

function MeterRow({ row }: { row: RegisterRow }) {
  const due = effectiveDue(row);
  const state = STATE_LABEL[row.state];
  const verdict = row.lastVerdict ? VERDICT_LABEL[row.lastVerdict] : null;
  return (
    <tr className={`due-${due} state-${row.state}`} data-asset-id={row.assetId}>
      <th scope="row" className="asset">
        <a href={href.meter(row.assetId)}>{row.assetId}</a>
      </th>
      <td>{row.description || <span className="muted">(no description)</span>}</td>
      <td>{row.construction === 'waveguide' ? 'Waveguide' : 'Coaxial'}</td>
      <td className="num">{formatBand(row.minHz, row.maxHz)}</td>
      <td>
        <span className={`badge state-badge-${row.state}`}>
          <span aria-hidden="true">{state.symbol}</span> {state.word}
        </span>
      </td>
      <td>
        {verdict ? (
          <span className={`verdict verdict-${row.lastVerdict}`}>
            <span aria-hidden="true">{verdict.symbol}</span> {verdict.word}
          </span>
        ) : (
          <span className="muted">Not checked yet</span>
        )}
      </td>
      <td className="num">{row.dueDate ?? '—'}</td>
      <td className={`num days days-${due}`}>
        {row.state === 'withdrawn' ? (
          <span className="muted">not in use</span>
        ) : due === 'overdue' ? (
          <strong>
            <span aria-hidden="true">⚠ </span>
            {formatDays(row.daysToDue)}
          </strong>
        ) : (
          formatDays(row.daysToDue)
        )}
      </td>
    </tr>
  );
}
