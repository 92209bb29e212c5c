/** A column of a chart's table: its heading, and whether it holds figures (right-aligned). */
export interface TableColumn {
  readonly label: string;
  readonly num?: boolean;
}

/** "The same as a table" under a chart, folded: the chart's figures for those who cannot or would rather not read the drawing. */
export function ChartTable({ columns, rows }: { columns: readonly TableColumn[]; rows: ReadonlyArray<{ readonly key: string; readonly cells: readonly string[] }> }) {
  return (
    <details className="chart-table">
      <summary>The same as a table</summary>
      <div className="table-scroll">
        <table>
          <thead>
            <tr>
              {columns.map((c) => (
                <th key={c.label} scope="col" className={c.num ? 'num' : undefined}>
                  {c.label}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.key}>
                {r.cells.map((cell, i) => (
                  <td key={i} className={columns[i]?.num ? 'num' : undefined}>
                    {cell}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </details>
  );
}
