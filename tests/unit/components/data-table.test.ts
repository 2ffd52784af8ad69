// The shared data table (components/table/DataTable.tsx) rendered on the server: the panel's name, the filter
// field, the table's own controls and count, one row per record in the initial sort order with the row
// attributes the browser tests find them by, sortable headers spoken through aria-sort, and the sentence in
// place of rows when there are none.
import { describe, expect, it } from 'vitest';
import { createElement as h, type ReactElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { createColumnHelper, type SortingState } from '@tanstack/react-table';
import { DataTable, useFilteredTable } from '@/components/table/DataTable';

interface Item {
  name: string;
  size: number;
  active: boolean;
}

const column = createColumnHelper<Item>();
const columns = [column.accessor('name', { header: 'Name' }), column.accessor('size', { header: 'Size' })];

function Items({ items, initialSorting }: { items: Item[]; initialSorting: SortingState }): ReactElement {
  const { table, filter, setFilter } = useFilteredTable({ data: items, columns, initialSorting });
  return h(DataTable<Item>, {
    table,
    label: 'Items',
    filter: { value: filter, onChange: setFilter, placeholder: 'Name or size' },
    controls: h('label', null, 'Only mine'),
    count: `${table.getRowModel().rows.length} of ${items.length}`,
    empty: 'Nothing here yet.',
    rowProps: (row) => ({ className: row.original.active ? '' : 'text-graphite-faint', 'data-testid': 'item-row', 'data-name': row.original.name }),
  });
}

const ITEMS: Item[] = [
  { name: 'beta', size: 2, active: true },
  { name: 'alpha', size: 3, active: false },
  { name: 'gamma', size: 1, active: true },
];

describe('DataTable', () => {
  it('renders the panel, the filter, the controls, the count and the rows in the initial sort order', () => {
    const html = renderToStaticMarkup(h(Items, { items: ITEMS, initialSorting: [{ id: 'size', desc: true }] }));
    expect(html).toContain('aria-label="Items"');
    expect(html).toMatch(/<input[^>]*type="search"[^>]*placeholder="Name or size"/);
    expect(html).toContain('Only mine');
    expect(html).toContain('3 of 3');
    const names = [...html.matchAll(/data-testid="item-row" data-name="(\w+)"/g)].map((m) => m[1]);
    expect(names).toEqual(['alpha', 'beta', 'gamma']);
    // The inactive row keeps the rule under it and gains its own class.
    expect(html).toMatch(/<tr class="border-b border-rule last:border-0 text-graphite-faint" data-testid="item-row" data-name="alpha">/);
    expect(html).toMatch(/<tr class="border-b border-rule last:border-0" data-testid="item-row" data-name="beta">/);
    expect(html).toContain('aria-sort="descending"');
    expect(html).toContain('aria-sort="none"');
    expect(html).not.toContain('Nothing here yet.');
  });

  it('says so across every column when there are no rows', () => {
    const html = renderToStaticMarkup(h(Items, { items: [], initialSorting: [] }));
    expect(html).toContain('0 of 0');
    expect(html).toMatch(/<td colSpan="2"[^>]*>Nothing here yet\.<\/td>/);
    expect(html).not.toContain('data-testid="item-row"');
  });
});
