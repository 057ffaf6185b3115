import type { ReactNode } from 'react';

interface FieldProps {
  id: string;
  label: string;
  error?: string;
  hint?: string;
  children: (props: { id: string; 'aria-invalid': boolean; 'aria-describedby'?: string; className: string }) => ReactNode;
}

/** A label, a control and its error, wired for screen readers. */
export function Field({ id, label, error, hint, children }: FieldProps) {
  const describedBy = [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div>
      <label htmlFor={id} className="label">{label}</label>
      {children({ id, 'aria-invalid': Boolean(error), 'aria-describedby': describedBy, className: `input ${error ? 'input-error' : ''}` })}
      {hint && !error && <p id={`${id}-hint`} className="mt-1 text-xs text-galv-500">{hint}</p>}
      {error && <p id={`${id}-error`} className="field-error" role="alert">{error}</p>}
    </div>
  );
}

export function FormError({ message }: { message?: string | null }) {
  if (!message) return null;
  return <div role="alert" className="rounded-md border border-rust-600 bg-rust-100 px-3 py-2 text-sm text-rust-700">{message}</div>;
}
