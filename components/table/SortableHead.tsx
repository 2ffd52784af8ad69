'use client';
// The header row of every TanStack table in Modeshelf: a button per sortable column that cycles its sort,
// the state spoken through aria-sort and shown with a glyph, so each table describes only its columns.
import { flexRender, type Table } from '@tanstack/react-table';

interface SortableHeadProps<Row> {
  table: Table<Row>;
  /** Extra classes of each <th> (padding, alignment), the table's own density. */
  cellClassName?: string;
  /** Classes of the header row; the thin rule under headers by default. */
  rowClassName?: string;
}

export function SortableHead<Row>({ table, cellClassName = 'px-4 py-2', rowClassName = 'border-b border-rule' }: SortableHeadProps<Row>) {
  return (
    <thead>
      {table.getHeaderGroups().map((group) => (
        <tr key={group.id} className={rowClassName}>
          {group.headers.map((header) => {
            const canSort = header.column.getCanSort();
            const sorted = header.column.getIsSorted();
            const label = flexRender(header.column.columnDef.header, header.getContext());
            return (
              <th
                key={header.id}
                scope="col"
                className={`text-left font-medium ${cellClassName}`}
                aria-sort={!canSort ? undefined : sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}
              >
                {canSort ? (
                  <button
                    type="button"
                    className="field-label inline-flex items-center gap-1 hover:text-teal"
                    onClick={header.column.getToggleSortingHandler()}
                  >
                    {label}
                    <span aria-hidden="true" className="text-xs text-graphite-soft">
                      {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                    </span>
                  </button>
                ) : (
                  label
                )}
              </th>
            );
          })}
        </tr>
      ))}
    </thead>
  );
}
