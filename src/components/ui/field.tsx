import {
  useId,
  type InputHTMLAttributes,
  type ReactNode,
  type SelectHTMLAttributes,
  type TextareaHTMLAttributes,
} from 'react';

interface FieldProps {
  label: string;
  error?: string;
  hint?: ReactNode;
}

/** The attributes that tie a field's control to its label and messages. */
interface ControlProps {
  id: string;
  'aria-invalid': true | undefined;
  'aria-describedby': string | undefined;
  className: string;
}

const inputClass =
  'mt-1 block w-full rounded-lg border border-slate-300 bg-white px-3 py-2 text-sm shadow-sm focus:border-lamina-500 aria-[invalid=true]:border-red-600';

/** Label, control, and the hint or error, with the ids screen readers need. */
function Field({
  label,
  error,
  hint,
  control,
}: FieldProps & { control: (props: ControlProps) => ReactNode }) {
  const id = useId();
  return (
    <div>
      <label
        htmlFor={id}
        className="block text-sm font-semibold text-slate-700"
      >
        {label}
      </label>
      {control({
        id,
        'aria-invalid': error ? true : undefined,
        'aria-describedby': error
          ? `${id}-error`
          : hint
            ? `${id}-hint`
            : undefined,
        className: inputClass,
      })}
      {hint && !error && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-slate-500">
          {hint}
        </p>
      )}
      {error && (
        <p
          id={`${id}-error`}
          role="alert"
          className="mt-1 text-xs text-red-700"
        >
          {error}
        </p>
      )}
    </div>
  );
}

/** A labelled input with its error message tied to it for screen readers. */
export function TextField({
  label,
  error,
  hint,
  ...input
}: FieldProps & InputHTMLAttributes<HTMLInputElement>) {
  return (
    <Field
      label={label}
      error={error}
      hint={hint}
      control={(props) => <input {...props} {...input} />}
    />
  );
}

/** A labelled select with its error message tied to it for screen readers. */
export function SelectField({
  label,
  error,
  hint,
  children,
  ...select
}: FieldProps & SelectHTMLAttributes<HTMLSelectElement>) {
  return (
    <Field
      label={label}
      error={error}
      hint={hint}
      control={(props) => (
        <select {...props} {...select}>
          {children}
        </select>
      )}
    />
  );
}

/** A labelled text area with its error message tied to it for screen readers. */
export function TextAreaField({
  label,
  error,
  hint,
  ...textarea
}: FieldProps & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  return (
    <Field
      label={label}
      error={error}
      hint={hint}
      control={(props) => <textarea {...props} {...textarea} />}
    />
  );
}
