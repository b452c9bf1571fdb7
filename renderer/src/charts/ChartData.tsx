// A chart's data as a table, folded under the chart inside the same figure: the text alternative
// for a person who cannot see the drawing, and the exact figures for anyone who wants them.

export interface ChartTable {
  /** What the table holds, as its caption. */
  caption: string;
  /** Column headings, with units. */
  columns: string[];
  rows: (string | number)[][];
}

export function ChartData({ name, table }: { name: string; table: ChartTable }) {
  return (
    <details className="chart-data">
      <summary>The data of “{name}” as a table</summary>
      <div className="table-wrap">
        <table className="grid">
          <caption>{table.caption}</caption>
          <thead>
            <tr>
              {table.columns.map((c) => (
                <th key={c} scope="col">
                  {c}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {table.rows.length === 0 ? (
              <tr>
                <td colSpan={table.columns.length}>No data.</td>
              </tr>
            ) : (
              table.rows.map((r, i) => (
                <tr key={i}>
                  {r.map((v, k) => (
                    <td key={k} className={typeof v === 'number' ? 'num' : undefined}>
                      {v}
                    </td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </details>
  );
}

/** A number for a data table, with a fixed number of decimals and a true minus sign. */
export function cell(x: number | undefined | null, decimals: number): string {
  if (x === undefined || x === null || !Number.isFinite(x)) return '—';
  return x.toFixed(decimals).replace('-', '−');
}
