import type { ReactNode } from 'react';

/** What a control needs to be tied to its label, hint and error. */
export type FieldA11y = {
  id: string;
  'aria-invalid': true | undefined;
  'aria-describedby': string | undefined;
};

/**
 * One field of a form: its label, the control (rendered by `children` with the id and the aria
 * attributes), an optional hint, and its error right below it, marked for screen readers
 * (aria-invalid on the control, aria-describedby naming the hint and the error).
 */
export function FormField({
  id,
  label,
  hint,
  error,
  className,
  children,
}: {
  id: string;
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  className?: string;
  children: (a11y: FieldA11y) => ReactNode;
}) {
  const describedBy = [hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(' ');
  return (
    <div className={className}>
      <label className="label" htmlFor={id}>
        {label}
      </label>
      {children({ id, 'aria-invalid': error ? true : undefined, 'aria-describedby': describedBy || undefined })}
      {hint ? (
        <p id={`${id}-hint`} className="mt-0.5 text-xs text-[var(--color-muted)]">
          {hint}
        </p>
      ) : null}
      <FieldError id={id} error={error} />
    </div>
  );
}

/** The error line of a field (for controls that FormField does not wrap: checkboxes, groups). */
export function FieldError({ id, error }: { id: string; error?: string }) {
  if (!error) return null;
  return (
    <p id={`${id}-error`} className="field-error mt-1 text-sm">
      {error}
    </p>
  );
}

/** The form's own message: a summary of the marked fields and what has no field, announced when it appears. */
export function FormMessage({ message }: { message: string | null }) {
  if (!message) return null;
  return (
    <p className="notice-bad text-sm" role="alert" data-testid="form-message">
      {message}
    </p>
  );
}
