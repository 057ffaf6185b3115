import type { ReactNode } from 'react';
import { flexRender, type Table } from '@tanstack/react-table';

/** A dense table whose headers sort (tanstack v8 table instance), with an empty-state row. */
export function SortableTable<T>({ table, loading, empty, footer }: { table: Table<T>; loading?: boolean; empty: string; footer?: ReactNode }) {
  const width = table.getAllLeafColumns().length;
  const rows = table.getRowModel().rows;
  return (
    <table className="table-dense" aria-busy={loading}>
      <thead>
        {table.getHeaderGroups().map((hg) => (
          <tr key={hg.id}>
            {hg.headers.map((h) => {
              const sorted = h.column.getIsSorted();
              return (
                <th key={h.id} aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}>
                  <button type="button" className="flex items-center gap-1" onClick={h.column.getToggleSortingHandler()}>
                    {flexRender(h.column.columnDef.header, h.getContext())}
                    <span aria-hidden="true" className="text-galv-400">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
                  </button>
                </th>
              );
            })}
          </tr>
        ))}
      </thead>
      <tbody className={loading ? 'opacity-60' : ''}>
        {rows.map((row) => <tr key={row.id}>{row.getVisibleCells().map((cell) => <td key={cell.id}>{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>)}</tr>)}
        {rows.length === 0 && <tr><td colSpan={width} className="py-6 text-center text-galv-500">{empty}</td></tr>}
      </tbody>
      {footer}
    </table>
  );
}
