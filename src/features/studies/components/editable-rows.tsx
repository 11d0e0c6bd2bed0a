import type { ReactNode } from 'react';
import { Button } from '../../../components/ui/button.tsx';

interface EditableRowsProps<Row> {
  legend: string;
  rows: Row[];
  onChange: (rows: Row[]) => void;
  /** A blank row for the add button. */
  newRow: () => Row;
  addLabel: string;
  /** Shown under the legend: an error for the whole list, or a note. */
  notice?: ReactNode;
  /** Rows that must stay: their remove buttons are disabled. */
  minRows?: number;
  rowTestId?: (index: number) => string;
  /** The row's fields; `update` merges a change into this row. */
  renderFields: (
    row: Row,
    index: number,
    update: (change: Partial<Row>) => void,
  ) => ReactNode;
}

/** A fieldset of same-shaped rows that can be added and removed. */
export function EditableRows<Row>({
  legend,
  rows,
  onChange,
  newRow,
  addLabel,
  notice,
  minRows = 0,
  rowTestId,
  renderFields,
}: EditableRowsProps<Row>) {
  const update = (index: number, change: Partial<Row>) =>
    onChange(rows.map((row, i) => (i === index ? { ...row, ...change } : row)));

  return (
    <fieldset className="space-y-3">
      <legend className="text-sm font-semibold text-slate-700">{legend}</legend>
      {notice}
      {rows.map((row, i) => (
        <div
          key={i}
          className="grid items-end gap-3 sm:grid-cols-5"
          data-testid={rowTestId?.(i)}
        >
          {renderFields(row, i, (change) => update(i, change))}
          <Button
            variant="quiet"
            disabled={rows.length <= minRows}
            onClick={() => onChange(rows.filter((_, j) => j !== i))}
          >
            Remove
          </Button>
        </div>
      ))}
      <Button variant="secondary" onClick={() => onChange([...rows, newRow()])}>
        {addLabel}
      </Button>
    </fieldset>
  );
}
