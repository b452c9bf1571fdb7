// The register table: one row per meter, sortable by column, and windowed so a fleet of
// thousands of meters mounts only the rows in view (@tanstack/react-virtual measures each row,
// since flags wrap). It stays a real table for assistive technology: aria-rowcount on
// the table and aria-rowindex on each row say where a row sits in the whole list.
import { measureElement, observeElementRect, useVirtualizer } from '@tanstack/react-virtual';
import type { Virtualizer } from '@tanstack/react-virtual';
import { memo, useCallback, useRef } from 'react';
import type { RegisterRow } from '../../../app/api/contract';
import { STATE_LABEL, VERDICT_LABEL, formatBand, formatDays } from '../shared/format';
import { effectiveDue } from './registerFilters';
import type { Sort, SortKey } from './registerFilters';
import { href } from '../shared/routes';

/** A one-line row's height, px, before it is measured. */
const ROW_PX = 37;
/** Rows mounted beyond each edge of the view, so fast scrolling and Tab rarely meet a blank. */
const OVERSCAN = 8;
/** The view assumed while the scroll box has no layout yet (first paint, or a DOM without
 * layout): about sixteen rows, a window rather than the whole list. */
const NO_LAYOUT_RECT = { width: 1200, height: 600 };
/** Above this many rows the table scrolls in its own frame, which keeps the window small; a
 * bench's register flows with the page and shows every row (all mounted, as the frame is not
 * bounded then). */
const FRAMED_ROWS = 40;

interface Column {
  key: SortKey;
  title: string;
  num?: boolean;
}

export const COLUMNS: Column[] = [
  { key: 'assetId', title: 'Asset id' },
  { key: 'construction', title: 'Construction' },
  { key: 'band', title: 'Band', num: true },
  { key: 'state', title: 'State' },
  { key: 'verdict', title: 'Last verdict' },
  { key: 'due', title: 'Due date', num: true },
  { key: 'due', title: 'Days to due', num: true },
  { key: 'flags', title: 'Flags' },
];

function rectOrDefault(
  instance: Virtualizer<HTMLDivElement, Element>,
  cb: (r: { width: number; height: number }) => void,
) {
  return observeElementRect(instance, (rect) => cb(rect.height > 0 ? rect : NO_LAYOUT_RECT));
}

function measuredOrEstimate(
  el: Element,
  entry: ResizeObserverEntry | undefined,
  instance: Virtualizer<HTMLDivElement, Element>,
): number {
  const px = measureElement(el, entry, instance);
  return px > 0 ? px : ROW_PX;
}

/** Memoised: a keystroke re-renders the filters at once and this table only when the deferred
 * filter result changes. */
export const RegisterTable = memo(function RegisterTable({
  rows,
  total,
  sort,
  onSort,
  emptyText,
  flagsLoaded,
}: {
  rows: RegisterRow[];
  /** Meters in the register before filtering. */
  total: number;
  sort: Sort;
  onSort: (key: SortKey) => void;
  emptyText: string;
  flagsLoaded: boolean;
}) {
  const scrollRef = useRef<HTMLDivElement>(null);
  const getItemKey = useCallback((i: number) => rows[i]?.assetId ?? i, [rows]);
  const virtualizer = useVirtualizer({
    count: rows.length,
    getScrollElement: () => scrollRef.current,
    estimateSize: () => ROW_PX,
    overscan: OVERSCAN,
    getItemKey,
    observeElementRect: rectOrDefault,
    measureElement: measuredOrEstimate,
    // React 19 warns about flushSync from inside a render; a frame later is fine for a table.
    useFlushSync: false,
  });
  const items = virtualizer.getVirtualItems();
  const padTop = items[0]?.start ?? 0;
  const padBottom = Math.max(0, virtualizer.getTotalSize() - (items[items.length - 1]?.end ?? 0));

  return (
    <div
      className={`table-wrap register-scroll${rows.length > FRAMED_ROWS ? ' framed' : ''}`}
      ref={scrollRef}
      data-testid="register-scroll"
    >
      <table className="register" aria-rowcount={rows.length + 1} data-total={total}>
        <caption className="visually-hidden">
          Meters in the register, {rows.length} of {total}, sorted by{' '}
          {COLUMNS.find((c) => c.key === sort.key)?.title.toLowerCase()}, {sort.dir}
        </caption>
        <thead>
          <tr aria-rowindex={1}>
            {COLUMNS.map((c) => {
              // Both due columns sort the same way; one header carries the sort, as ARIA expects.
              const sorted = sort.key === c.key && COLUMNS.find((x) => x.key === c.key) === c;
              return (
                <th
                  key={c.title}
                  scope="col"
                  className={`${c.num ? 'num ' : ''}col-${c.title.toLowerCase().replace(/ /g, '-')}`}
                  aria-sort={sorted ? sort.dir : undefined}
                >
                  <button type="button" className="sort" onClick={() => onSort(c.key)}>
                    {c.title}
                  </button>
                </th>
              );
            })}
          </tr>
        </thead>
        <tbody>
          {padTop > 0 && (
            <tr className="spacer" aria-hidden="true">
              <td colSpan={COLUMNS.length} style={{ height: padTop }} />
            </tr>
          )}
          {items.map((item) => {
            const row = rows[item.index];
            return row ? (
              <MeterRow
                key={item.key}
                row={row}
                index={item.index}
                measure={virtualizer.measureElement}
                flagsLoaded={flagsLoaded}
              />
            ) : null;
          })}
          {padBottom > 0 && (
            <tr className="spacer" aria-hidden="true">
              <td colSpan={COLUMNS.length} style={{ height: padBottom }} />
            </tr>
          )}
          {rows.length === 0 && (
            <tr>
              <td colSpan={COLUMNS.length} className="empty">
                {emptyText}
              </td>
            </tr>
          )}
        </tbody>
      </table>
    </div>
  );
});

function MeterRow({
  row,
  index,
  measure,
  flagsLoaded,
}: {
  row: RegisterRow;
  index: number;
  measure: (el: Element | null) => void;
  flagsLoaded: boolean;
}) {
  const due = effectiveDue(row);
  const state = STATE_LABEL[row.state];
  const verdict = row.lastVerdict ? VERDICT_LABEL[row.lastVerdict] : null;
  const flags = row.flags ?? [];
  return (
    <tr
      ref={measure}
      data-index={index}
      aria-rowindex={index + 2}
      className={`due-${due} state-${row.state}`}
      data-asset-id={row.assetId}
    >
      <th scope="row" className="asset">
        <a href={href.meter(row.assetId)}>{row.assetId}</a>
        {/* Under the id, cut to one line; the whole text on hover and for assistive technology. */}
        <span className="asset-description" title={row.description || undefined}>
          {row.description || <span className="muted">(no description)</span>}
        </span>
      </th>
      <td>{row.construction === 'waveguide' ? 'Waveguide' : 'Coaxial'}</td>
      <td className="num">{formatBand(row.minHz, row.maxHz)}</td>
      <td>
        <span className={`badge state-badge-${row.state}`}>
          <span aria-hidden="true">{state.symbol}</span> {state.word}
        </span>
      </td>
      <td>
        {verdict ? (
          <>
            <span className={`verdict verdict-${row.lastVerdict}`}>
              <span aria-hidden="true">{verdict.symbol}</span> {verdict.word}
            </span>
            {row.lastCheckDate && <span className="verdict-date">{row.lastCheckDate}</span>}
          </>
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
      <td className="flags-cell">
        {flags.length > 0 ? (
          <ul className="register-flags">
            {flags.map((f) => (
              <li key={f}>
                <span aria-hidden="true">⚑ </span>
                {f}
              </li>
            ))}
          </ul>
        ) : (
          <span className="muted">{row.state === 'withdrawn' ? '—' : flagsLoaded ? 'none' : 'loading…'}</span>
        )}
      </td>
    </tr>
  );
}
