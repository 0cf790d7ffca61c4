import {
  useId,
  type InputHTMLAttributes,
  type ReactNode,
  type Ref,
  type SelectHTMLAttributes,
  type TextareaHTMLAttributes,
} from "react";
import { cx } from "./cx.ts";

interface FieldChrome {
  /** Visible label, tied to the control. */
  label: ReactNode;
  /** Error text; marks the control invalid and is read with it. */
  error?: string | undefined;
  /** Help text shown under the control, read with it. */
  hint?: ReactNode;
  /** Visually hide the label (it stays for screen readers). */
  hideLabel?: boolean;
  /** Extra classes for the wrapper. */
  wrapperClassName?: string;
}

const control =
  "block w-full rounded-md border bg-white px-3 text-sm text-ink-900 shadow-xs placeholder:text-ink-300 " +
  "focus:border-film-teal focus:outline-none focus:ring-2 focus:ring-film-teal/30 disabled:bg-ink-100 disabled:text-ink-500";

function useFieldIds(id: string | undefined) {
  const auto = useId();
  const base = id ?? auto;
  return { id: base, hintId: `${base}-hint`, errorId: `${base}-error` };
}

function describedBy(hintId: string, errorId: string, hint: unknown, error: unknown, extra?: string) {
  return (
    [extra, hint ? hintId : undefined, error ? errorId : undefined].filter(Boolean).join(" ") || undefined
  );
}

function Chrome({
  id,
  hintId,
  errorId,
  label,
  error,
  hint,
  hideLabel,
  wrapperClassName,
  required,
  children,
}: FieldChrome & {
  id: string;
  hintId: string;
  errorId: string;
  required?: boolean | undefined;
  children: ReactNode;
}) {
  return (
    <div className={cx("flex flex-col gap-1", wrapperClassName)}>
      <label htmlFor={id} className={cx("text-sm font-medium text-ink-800", hideLabel && "sr-only")}>
        {label}
        {required && (
          <span aria-hidden className="ml-0.5 text-film-amber">
            *
          </span>
        )}
      </label>
      {children}
      {hint && (
        <p id={hintId} className="text-xs text-ink-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="text-xs font-medium text-verdict-fail">
          {error}
        </p>
      )}
    </div>
  );
}

export type TextFieldProps = FieldChrome &
  InputHTMLAttributes<HTMLInputElement> & { ref?: Ref<HTMLInputElement> };

/** A labelled text input with hint and error text wired through aria-describedby. Works with react-hook-form's `register`. */
export function TextField({
  label,
  error,
  hint,
  hideLabel,
  wrapperClassName,
  id,
  className,
  ...rest
}: TextFieldProps) {
  const ids = useFieldIds(id);
  return (
    <Chrome
      {...ids}
      label={label}
      error={error}
      hint={hint}
      hideLabel={hideLabel}
      wrapperClassName={wrapperClassName}
      required={rest.required}
    >
      <input
        id={ids.id}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(ids.hintId, ids.errorId, hint, error, rest["aria-describedby"])}
        className={cx(control, "h-10", error ? "border-verdict-fail" : "border-ink-300", className)}
        {...rest}
      />
    </Chrome>
  );
}

export interface SelectOption {
  value: string;
  label: string;
  disabled?: boolean;
}

export type SelectFieldProps = FieldChrome &
  SelectHTMLAttributes<HTMLSelectElement> & {
    /** Options; children may be given instead. */
    options?: SelectOption[];
    /** A first, empty option (e.g. "Choose…"). */
    placeholder?: string;
    ref?: Ref<HTMLSelectElement>;
  };

/** A labelled native select. */
export function SelectField({
  label,
  error,
  hint,
  hideLabel,
  wrapperClassName,
  id,
  className,
  options,
  placeholder,
  children,
  ...rest
}: SelectFieldProps) {
  const ids = useFieldIds(id);
  return (
    <Chrome
      {...ids}
      label={label}
      error={error}
      hint={hint}
      hideLabel={hideLabel}
      wrapperClassName={wrapperClassName}
      required={rest.required}
    >
      <select
        id={ids.id}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(ids.hintId, ids.errorId, hint, error, rest["aria-describedby"])}
        className={cx(control, "h-10 pr-8", error ? "border-verdict-fail" : "border-ink-300", className)}
        {...rest}
      >
        {placeholder !== undefined && <option value="">{placeholder}</option>}
        {options?.map((o) => (
          <option key={o.value} value={o.value} disabled={o.disabled}>
            {o.label}
          </option>
        ))}
        {children}
      </select>
    </Chrome>
  );
}

export type TextAreaProps = FieldChrome &
  TextareaHTMLAttributes<HTMLTextAreaElement> & { ref?: Ref<HTMLTextAreaElement> };

/** A labelled multi-line text input. */
export function TextArea({
  label,
  error,
  hint,
  hideLabel,
  wrapperClassName,
  id,
  className,
  rows = 4,
  ...rest
}: TextAreaProps) {
  const ids = useFieldIds(id);
  return (
    <Chrome
      {...ids}
      label={label}
      error={error}
      hint={hint}
      hideLabel={hideLabel}
      wrapperClassName={wrapperClassName}
      required={rest.required}
    >
      <textarea
        id={ids.id}
        rows={rows}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(ids.hintId, ids.errorId, hint, error, rest["aria-describedby"])}
        className={cx(control, "py-2", error ? "border-verdict-fail" : "border-ink-300", className)}
        {...rest}
      />
    </Chrome>
  );
}

export interface CheckboxProps extends InputHTMLAttributes<HTMLInputElement> {
  label: ReactNode;
  ref?: Ref<HTMLInputElement>;
}

/** A checkbox with its label beside it. */
export function Checkbox({ label, id, className, ...rest }: CheckboxProps) {
  const auto = useId();
  const cid = id ?? auto;
  return (
    <label htmlFor={cid} className={cx("inline-flex items-center gap-2 text-sm text-ink-800", className)}>
      <input id={cid} type="checkbox" className="h-4 w-4 rounded border-ink-300 accent-film-teal" {...rest} />
      {label}
    </label>
  );
}
