import { Button } from '../../../components/ui/button.tsx';

interface RecordActionsProps {
  /** What the buttons call the record: room, detector, grid. */
  noun: string;
  /** The record's own name, asked about before it is deleted. */
  name: string;
  canEdit: boolean;
  canDelete: boolean;
  isEditing: boolean;
  onEdit: () => void;
  isDeleting: boolean;
  onDelete: () => void;
}

/** Change and delete buttons of an equipment record's page, as allowed. */
export function RecordActions({
  noun,
  name,
  canEdit,
  canDelete,
  isEditing,
  onEdit,
  isDeleting,
  onDelete,
}: RecordActionsProps) {
  if (!canEdit && !canDelete) return null;
  return (
    <div className="flex gap-3">
      {canEdit && !isEditing && (
        <Button variant="secondary" onClick={onEdit}>
          {`Change ${noun}`}
        </Button>
      )}
      {canDelete && (
        <Button
          variant="danger"
          disabled={isDeleting}
          onClick={() => {
            if (window.confirm(`Delete ${name}?`)) onDelete();
          }}
        >
          {`Delete ${noun}`}
        </Button>
      )}
    </div>
  );
}
