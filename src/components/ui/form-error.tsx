interface FormErrorProps {
  /** The failed request's error; field errors are shown beside their fields. */
  error: { message: string; details: readonly unknown[] } | null;
  className?: string;
}

/** The form's own error, shown only when the server named no field. */
export function FormError({ error, className = '' }: FormErrorProps) {
  if (!error || error.details.length > 0) return null;
  return (
    <p role="alert" className={`text-sm text-red-700 ${className}`.trim()}>
      {error.message}
    </p>
  );
}
