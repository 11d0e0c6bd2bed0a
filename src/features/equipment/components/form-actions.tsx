import { Button } from '../../../components/ui/button.tsx';

interface FormActionsProps {
  submitLabel: string;
  isDisabled: boolean;
  variant?: 'primary' | 'secondary';
  /** Offers a cancel button when given. */
  onCancel?: () => void;
  className: string;
}

/** A form's submit button and, when it can be left, its cancel button. */
export function FormActions({
  submitLabel,
  isDisabled,
  variant = 'primary',
  onCancel,
  className,
}: FormActionsProps) {
  return (
    <div className={className}>
      <Button type="submit" variant={variant} disabled={isDisabled}>
        {submitLabel}
      </Button>
      {onCancel && (
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      )}
    </div>
  );
}
