"use client";

import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { z } from "zod";
import type { ActionResult } from "@/lib/api/action";

// Admin forms: values are validated with the same shared zod schema the server action uses, errors are shown
// at their field (aria-invalid + aria-describedby) once the field has been changed or the form submitted, and the
// server's own field errors (e.g. a duplicate e-mail) land at the same place.

export type FieldErrors = Record<string, string[] | undefined>;

export function schemaFieldErrors(schema: z.ZodType, input: unknown): FieldErrors {
  const result = schema.safeParse(input);
  return result.success ? {} : (z.flattenError(result.error).fieldErrors as FieldErrors);
}

function mergeErrors(a: FieldErrors, b: FieldErrors): FieldErrors {
  const out: FieldErrors = { ...a };
  for (const [k, v] of Object.entries(b)) if (v?.length) out[k] = [...(out[k] ?? []), ...v];
  return out;
}

type Values = Record<string, unknown>;

export type FormApi<V extends Values> = {
  id: string;
  values: V;
  set: <K extends keyof V & string>(name: K, value: V[K]) => void;
  /** The message to show at a field now, if any. */
  errorOf: (name: keyof V & string) => string | undefined;
  fieldId: (name: keyof V & string) => string;
  formError: string | null;
  pending: boolean;
  /** Validates, calls the action, and returns its data, or null after showing the errors. */
  submit: <T>(action: (input: unknown) => Promise<ActionResult<T>>) => Promise<T | null>;
  reset: (values: V) => void;
};

export function useSchemaForm<V extends Values>(options: {
  schema: z.ZodType;
  initial: V;
  /** What is sent to the schema and the action; defaults to the values themselves. */
  toInput?: (values: V) => unknown;
  /** Checks that need data the schema lacks (e.g. the chosen model's rated pressure). */
  check?: (values: V) => FieldErrors;
}): FormApi<V> {
  const { schema, toInput = (v: V) => v, check } = options;
  const id = useId();
  const [values, setValues] = useState<V>(options.initial);
  const [touched, setTouched] = useState<ReadonlySet<string>>(new Set());
  const [submitted, setSubmitted] = useState(false);
  const [serverErrors, setServerErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [focusTick, setFocusTick] = useState(0);

  // Cheap enough to run on every render; keeps the errors in step with every keystroke.
  const clientErrors = mergeErrors(schemaFieldErrors(schema, toInput(values)), check?.(values) ?? {});

  useEffect(() => {
    if (!focusTick) return;
    // The form carries id={form.id}; a ref handed out in the form object would make the whole object a ref to React's rules.
    const first = document.getElementById(id)?.querySelector<HTMLElement>('[aria-invalid="true"]');
    first?.focus();
  }, [focusTick, id]);

  const errorOf = (name: string) =>
    serverErrors[name]?.[0] ?? (submitted || touched.has(name) ? clientErrors[name]?.[0] : undefined);

  return {
    id,
    values,
    set: (name, value) => {
      setValues((v) => ({ ...v, [name]: value }));
      setTouched((t) => (t.has(name) ? t : new Set(t).add(name)));
      setServerErrors((e) => {
        if (!(name in e)) return e;
        const { [name]: _dropped, ...rest } = e;
        return rest;
      });
    },
    errorOf,
    fieldId: (name) => `${id}-${name}`,
    formError,
    pending,
    async submit<T>(action: (input: unknown) => Promise<ActionResult<T>>) {
      setSubmitted(true);
      const problems = Object.values(clientErrors).some((v) => v?.length);
      if (problems) {
        setFormError("Some values need correcting.");
        setFocusTick((n) => n + 1);
        return null;
      }
      setPending(true);
      setFormError(null);
      try {
        const result = await action(toInput(values));
        if (result.ok) {
          setServerErrors({});
          return result.data;
        }
        setServerErrors(result.fieldErrors ?? {});
        setFormError(result.error);
        setFocusTick((n) => n + 1);
        return null;
      } catch {
        setFormError("The server could not be reached. Check the connection and try again.");
        return null;
      } finally {
        setPending(false);
      }
    },
    reset: (next) => {
      setValues(next);
      setTouched(new Set());
      setSubmitted(false);
      setServerErrors({});
      setFormError(null);
    },
  };
}

// ---- Pieces ----------------------------------------------------------------------------------------

const inputClass =
  "w-full rounded border bg-white px-2 py-1 text-sm text-ink aria-[invalid=true]:border-2 aria-[invalid=true]:border-ink disabled:bg-panel";

function describedBy(...ids: (string | false | undefined)[]): string | undefined {
  const list = ids.filter(Boolean);
  return list.length ? list.join(" ") : undefined;
}

export function FieldError({ id, message }: { id: string; message: string | undefined }) {
  if (!message) return null;
  return (
    <p id={id} className="mt-0.5 border-l-4 border-ink pl-1.5 text-xs font-semibold text-ink" data-field-error="">
      {message.charAt(0).toUpperCase() + message.slice(1)}
    </p>
  );
}

type BaseFieldProps<V extends Values> = {
  form: FormApi<V>;
  name: keyof V & string;
  label: string;
  hint?: ReactNode;
  className?: string;
  disabled?: boolean;
};

export function TextField<V extends Values>({
  form,
  name,
  label,
  hint,
  className,
  disabled,
  type = "text",
  unit,
  numeric,
  autoComplete,
  placeholder,
  maxLength,
}: BaseFieldProps<V> & {
  type?: "text" | "email" | "password";
  unit?: string;
  numeric?: boolean;
  autoComplete?: string;
  placeholder?: string;
  maxLength?: number;
}) {
  const id = form.fieldId(name);
  const error = form.errorOf(name);
  const raw = form.values[name];
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-xs font-semibold text-muted">
        {label}
        {unit && <span className="sr-only"> in {unit}</span>}
      </label>
      <div className="mt-0.5 flex items-center gap-1">
        <input
          id={id}
          name={name}
          type={type}
          inputMode={numeric ? "decimal" : undefined}
          autoComplete={autoComplete ?? "off"}
          spellCheck={false}
          placeholder={placeholder}
          maxLength={maxLength}
          disabled={disabled}
          value={raw == null ? "" : String(raw)}
          onChange={(e) => form.set(name, e.target.value as V[typeof name])}
          aria-invalid={error ? true : undefined}
          aria-describedby={describedBy(hint ? `${id}-hint` : undefined, error ? `${id}-error` : undefined)}
          className={`${inputClass} ${error ? "border-ink" : "border-line"} ${numeric ? "num text-right" : ""}`}
        />
        {unit && (
          <span aria-hidden="true" className="num min-w-10 text-xs text-muted">
            {unit}
          </span>
        )}
      </div>
      {hint && (
        <p id={`${id}-hint`} className="mt-0.5 text-xs text-muted">
          {hint}
        </p>
      )}
      <FieldError id={`${id}-error`} message={error} />
    </div>
  );
}

export type Option = { value: string; label: string };

export function SelectField<V extends Values>({
  form,
  name,
  label,
  hint,
  className,
  disabled,
  options,
  placeholder,
}: BaseFieldProps<V> & { options: readonly Option[]; placeholder?: string }) {
  const id = form.fieldId(name);
  const error = form.errorOf(name);
  const raw = form.values[name];
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-xs font-semibold text-muted">
        {label}
      </label>
      <select
        id={id}
        name={name}
        disabled={disabled}
        value={raw == null ? "" : String(raw)}
        onChange={(e) => form.set(name, e.target.value as V[typeof name])}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(hint ? `${id}-hint` : undefined, error ? `${id}-error` : undefined)}
        className={`mt-0.5 ${inputClass} ${error ? "border-ink" : "border-line"}`}
      >
        {placeholder !== undefined && <option value="">{placeholder}</option>}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {hint && (
        <p id={`${id}-hint`} className="mt-0.5 text-xs text-muted">
          {hint}
        </p>
      )}
      <FieldError id={`${id}-error`} message={error} />
    </div>
  );
}

export function CheckboxField<V extends Values>({ form, name, label, hint, className, disabled }: BaseFieldProps<V>) {
  const id = form.fieldId(name);
  const error = form.errorOf(name);
  return (
    <div className={className}>
      <label htmlFor={id} className="flex items-center gap-2 text-sm">
        <input
          id={id}
          name={name}
          type="checkbox"
          disabled={disabled}
          checked={Boolean(form.values[name])}
          onChange={(e) => form.set(name, e.target.checked as V[typeof name])}
          aria-invalid={error ? true : undefined}
          aria-describedby={describedBy(hint ? `${id}-hint` : undefined, error ? `${id}-error` : undefined)}
          className="h-4 w-4 accent-ink"
        />
        {label}
      </label>
      {hint && (
        <p id={`${id}-hint`} className="mt-0.5 text-xs text-muted">
          {hint}
        </p>
      )}
      <FieldError id={`${id}-error`} message={error} />
    </div>
  );
}

/** A set of checkboxes whose value is the list of checked ids (e.g. a site scope). */
export function CheckboxGroupField<V extends Values>({
  form,
  name,
  label,
  hint,
  className,
  disabled,
  options,
}: BaseFieldProps<V> & { options: readonly { value: number; label: string }[] }) {
  const id = form.fieldId(name);
  const error = form.errorOf(name);
  const chosen = (form.values[name] as number[] | undefined) ?? [];
  function toggle(value: number, on: boolean) {
    const next = on ? [...chosen, value] : chosen.filter((v) => v !== value);
    form.set(name, next as V[typeof name]);
  }
  return (
    <fieldset
      id={id}
      className={className}
      disabled={disabled}
      aria-describedby={describedBy(hint ? `${id}-hint` : undefined, error ? `${id}-error` : undefined)}
    >
      <legend className="text-xs font-semibold text-muted">{label}</legend>
      {options.length === 0 ? (
        <p className="text-sm text-muted">No sites yet.</p>
      ) : (
        <div className="mt-0.5 grid max-h-40 grid-cols-1 gap-x-4 gap-y-0.5 overflow-y-auto rounded border border-line bg-white px-2 py-1 sm:grid-cols-2">
          {options.map((o) => (
            <label key={o.value} className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                name={name}
                value={o.value}
                checked={chosen.includes(o.value)}
                onChange={(e) => toggle(o.value, e.target.checked)}
                aria-invalid={error ? true : undefined}
                className="h-4 w-4 accent-ink"
              />
              {o.label}
            </label>
          ))}
        </div>
      )}
      {hint && (
        <p id={`${id}-hint`} className="mt-0.5 text-xs text-muted">
          {hint}
        </p>
      )}
      <FieldError id={`${id}-error`} message={error} />
    </fieldset>
  );
}

/** The form-level message: announced when it appears. */
export function FormAlert({ message }: { message: string | null }) {
  if (!message) return null;
  return (
    <p role="alert" className="rounded border-2 border-ink bg-raised px-2 py-1.5 text-sm font-semibold text-ink">
      {message}
    </p>
  );
}

export function StatusLine({ message }: { message: string | null }) {
  return (
    <p role="status" className="min-h-5 text-sm text-muted">
      {message}
    </p>
  );
}

export const buttonClass = {
  primary:
    "rounded bg-ink px-3 py-1 text-sm font-semibold text-raised hover:bg-normal disabled:cursor-not-allowed disabled:opacity-60",
  secondary:
    "rounded border border-line bg-raised px-3 py-1 text-sm text-ink hover:bg-panel disabled:cursor-not-allowed disabled:opacity-60",
  small:
    "rounded border border-line bg-raised px-2 py-0.5 text-xs text-ink hover:bg-panel disabled:cursor-not-allowed disabled:opacity-50",
} as const;

/** A titled panel holding a create/edit form; its heading takes focus when it opens. */
export function FormPanel({ title, children }: { title: string; children: ReactNode }) {
  const headingId = useId();
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    headingRef.current?.focus();
  }, [title]);
  return (
    <section aria-labelledby={headingId} className="rounded border border-line bg-panel p-3">
      <h2 id={headingId} ref={headingRef} tabIndex={-1} className="mb-2 text-base font-semibold outline-none">
        {title}
      </h2>
      {children}
    </section>
  );
}

export function FormActions({
  pending,
  submitLabel,
  pendingLabel = "Saving…",
  onCancel,
}: {
  pending: boolean;
  submitLabel: string;
  pendingLabel?: string;
  onCancel: () => void;
}) {
  return (
    <div className="flex gap-2 pt-1">
      <button type="submit" className={buttonClass.primary} disabled={pending} aria-busy={pending || undefined}>
        {pending ? pendingLabel : submitLabel}
      </button>
      <button type="button" className={buttonClass.secondary} onClick={onCancel}>
        Cancel
      </button>
    </div>
  );
}
