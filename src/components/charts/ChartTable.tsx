import type { ChartData } from '@schemas/chart-text';
import { fmt } from './echarts';

/** The data of a chart as a table: one row per period, one column per line, values as the tooltip writes them. */
export function ChartTable({ data, caption }: { data: ChartData; caption: string }) {
  return (
    <table className="w-full border-collapse text-xs">
      <caption className="px-2 py-1 text-left text-ink-soft">
        {caption}: the data{data.unit ? ` (${data.unit})` : ''}
      </caption>
      <thead className="sticky top-0 bg-paper-deep">
        <tr>
          <th scope="col" className="px-2 py-1 text-left font-semibold text-ink-soft">
            {data.x}
          </th>
          {data.lines.map((l, k) => (
            <th key={k} scope="col" className="px-2 py-1 text-right font-semibold text-ink-soft">
              {l.name}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {data.rows.map((row, i) => (
          <tr key={row} className="border-t border-hairline">
            <th scope="row" className="px-2 py-0.5 text-left font-normal">
              {row}
            </th>
            {data.lines.map((l, k) => (
              <td key={k} className="num px-2 py-0.5">
                {l.values[i] === null ? '—' : fmt(l.values[i]!)}
              </td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
