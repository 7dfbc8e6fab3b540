import { forwardRef, useId, type InputHTMLAttributes } from 'react';

interface Props extends InputHTMLAttributes<HTMLInputElement> {
  label: string;
  error?: string;
  hint?: string;
}

/** A labelled input with its error said in words and tied to the input for screen readers. */
export const TextField = forwardRef<HTMLInputElement, Props>(function TextField({ label, error, hint, className = '', ...rest }, ref) {
  const id = useId();
  return (
    <div className={`flex flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="font-semibold text-ink">
        {label}
      </label>
      <input
        id={id}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}
        className={`min-h-11 rounded-md border bg-white px-3 py-2 text-ink ${error ? 'border-alarm-700' : 'border-spruce-700/40'}`}
        {...rest}
      />
      {hint && !error ? <p id={`${id}-hint`} className="text-sm text-ink-soft">{hint}</p> : null}
      {error ? <p id={`${id}-error`} className="text-sm font-semibold text-alarm-700">{error}</p> : null}
    </div>
  );
});
