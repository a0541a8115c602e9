import { render, screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { DataTable } from '../../src/components/data-table';

interface Row {
  code: string;
  n: number;
}

const rows: Row[] = Array.from({ length: 30 }, (_, i) => ({ code: `C${String(i + 1).padStart(2, '0')}`, n: (i * 7) % 30 }));

describe('DataTable', () => {
  it('sorts, filters and pages', async () => {
    render(
      <DataTable
        caption="Classifiers"
        rows={rows}
        columns={[
          { key: 'code', header: 'Code' },
          { key: 'n', header: 'Ratings', align: 'right' },
        ]}
        filterable
        pageSize={10}
      />,
    );
    const table = screen.getByRole('table', { name: 'Classifiers' });
    expect(within(table).getAllByRole('row')).toHaveLength(11);
    expect(screen.getByText(/Page 1 of 3/)).toBeInTheDocument();

    await userEvent.click(screen.getByRole('button', { name: /Ratings/ }));
    expect(within(table).getAllByRole('row')[1]).toHaveTextContent(/^C01\s*0$/);
    expect(screen.getByRole('columnheader', { name: /Ratings/ })).toHaveAttribute('aria-sort', 'ascending');

    await userEvent.type(screen.getByLabelText('Filter'), 'C2');
    expect(screen.queryByText(/Page 1 of/)).not.toBeInTheDocument();
    const shown = within(table).getAllByRole('row').slice(1);
    expect(shown).toHaveLength(10);
    for (const row of shown) expect(row).toHaveTextContent(/^C2\d/);
  });
});
