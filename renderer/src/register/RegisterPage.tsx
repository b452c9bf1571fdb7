// The register: every meter of the lab with its band, state, last verdict, due date and drift
// or health flags, narrowed by filters and sorted by column (soonest due first), and the lab's
// band coverage as the service reports it. Its data comes through useRegister (the flags and the
// coverage load on their own so the table shows first).
import { useCallback, useDeferredValue, useEffect, useMemo, useState } from 'react';
import type { RegisterRow } from '../../../app/api/contract';
import { Cautions } from '../shared/Cautions';
import { CoverageStrip } from './CoverageStrip';
import { RegisterFilterBar } from './RegisterFilterBar';
import { RegisterTable } from './RegisterTable';
import { SOON_DAYS } from '../shared/format';
import {
  DEFAULT_SORT,
  NO_FILTERS,
  effectiveDue,
  filterRows,
  filtersActive,
  sortRows,
} from './registerFilters';
import type { RegisterFilters, Sort, SortKey } from './registerFilters';
import { useRegister } from './useRegister';
import { AddMeterForm } from '../setup/AddMeterForm';
import { FirstRunGuide } from '../setup/FirstRunGuide';
import './register.css';

export { filterRows } from './registerFilters';

export function RegisterPage() {
  const { load, rows, flagLoad, coverageLoad } = useRegister();
  const [filters, setFilters] = useState<RegisterFilters>(NO_FILTERS);
  const [sort, setSort] = useState<Sort>(DEFAULT_SORT);
  const [adding, setAdding] = useState(false);
  // Typing stays quick with thousands of rows: the table follows a keystroke behind if it must.
  const deferredFilters = useDeferredValue(filters);

  const shown = useMemo(
    () => sortRows(filterRows(rows, deferredFilters), sort),
    [rows, deferredFilters, sort],
  );

  const onSort = useCallback(
    (key: SortKey) =>
      setSort((s) =>
        s.key === key
          ? { key, dir: s.dir === 'ascending' ? 'descending' : 'ascending' }
          : { key, dir: 'ascending' },
      ),
    [],
  );

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

      <div>
        {load.kind === 'loading' && <p className="status">Loading the register…</p>}
        {load.kind === 'failed' && (
          <p className="status error" role="alert">
            The register could not be loaded: {load.message}
          </p>
        )}
        {load.kind === 'ready' && rows.length === 0 && <FirstRunGuide onAddMeter={() => setAdding(true)} />}
        {load.kind === 'ready' && (
          <p>
            <button type="button" aria-expanded={adding} onClick={() => setAdding(!adding)}>
              Add a meter
            </button>
          </p>
        )}
        {adding && (
          <AddMeterForm
            onAdded={(assetId) => {
              setAdding(false);
              window.location.hash = `#/meter/${encodeURIComponent(assetId)}`;
            }}
          />
        )}
        {load.kind === 'ready' && (
          <>
            <RegisterFilterBar
              filters={filters}
              onChange={setFilters}
              flagsReady={flagLoad.kind === 'ready'}
            />
            <Summary all={rows} shown={shown} />
            {flagLoad.kind === 'failed' && (
              <p className="status error" role="alert">
                Drift and health flags could not be loaded: {flagLoad.message}
              </p>
            )}
            <RegisterTable
              rows={shown}
              total={rows.length}
              sort={sort}
              onSort={onSort}
              flagsLoaded={flagLoad.kind === 'ready'}
              emptyText={emptyText(rows.length, deferredFilters)}
            />
            {coverageLoad.kind === 'loading' && <p className="status">Loading the band coverage…</p>}
            {coverageLoad.kind === 'failed' && (
              <p className="status error" role="alert">
                The band coverage could not be loaded: {coverageLoad.message}
              </p>
            )}
            {coverageLoad.kind === 'ready' && <CoverageStrip report={coverageLoad.value} rows={load.rows} />}
          </>
        )}
      </div>

      <footer className="footnote">
        Dates are YYYY-MM-DD. Days to due are counted from today on the lab service’s clock; d = days. Flags
        (⚑) are drift and dip-health findings worth attention, from each meter’s history.
      </footer>
    </div>
  );
}

function emptyText(total: number, f: RegisterFilters): string {
  if (total === 0) return 'The register has no meters yet.';
  const textOnly = filtersActive(f) && !filtersActive({ ...f, text: '' });
  return textOnly ? `No meter matches “${f.text.trim()}”.` : 'No meter matches these filters.';
}

function Summary({ all, shown }: { all: RegisterRow[]; shown: RegisterRow[] }) {
  const overdue = all.filter((r) => effectiveDue(r) === 'overdue').length;
  const soon = all.filter((r) => ['today', 'soon'].includes(effectiveDue(r))).length;
  const count =
    shown.length === all.length ? `${all.length} meters` : `Showing ${shown.length} of ${all.length} meters`;
  return (
    <p className="summary register-summary" aria-live="polite" data-testid="register-count">
      <span>{count}</span>
      <span className={overdue > 0 ? 'tally tally-overdue' : 'tally'}>{overdue} overdue</span>
      <span className="tally">
        {soon} due within {SOON_DAYS} d
      </span>
    </p>
  );
}
