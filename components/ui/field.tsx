import { cloneElement, isValidElement, type ReactElement } from 'react';

/**
 * A labelled form control with an optional hint and error, wired for assistive technology: the
 * control gets aria-describedby for the hint and error and aria-invalid when there is an error.
 */
export function Field({
  id,
  label,
  hint,
  error,
  children,
  className = '',
  labelClassName = 'label',
}: {
  id: string;
  label: React.ReactNode;
  hint?: React.ReactNode;
  error?: React.ReactNode;
  children: ReactElement<Record<string, unknown>>;
  className?: string;
  labelClassName?: string;
}) {
  // A hint the control already names (one placed elsewhere on the page) stays named.
  const own = isValidElement(children) ? (children.props['aria-describedby'] as string | undefined) : undefined;
  const describedBy = [own, hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(' ') || undefined;
  const control = isValidElement(children)
    ? cloneElement(children, { id, 'aria-describedby': describedBy, ...(error ? { 'aria-invalid': true } : {}) })
    : children;
  return (
    <div className={className}>
      <label htmlFor={id} className={labelClassName}>
        {label}
      </label>
      {control}
      {hint && (
        <p id={`${id}-hint`} className="hint">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="error-text">
          {error}
        </p>
      )}
    </div>
  );
}
