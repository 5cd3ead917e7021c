/**
 * Form primitives: a labelled field with its unit and its error next to it, and buttons.
 * Errors are tied to their input with aria-describedby so that screen readers announce them.
 */
import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from "react";

export type FieldErrors = Partial<Record<string, string[] | undefined>>;

type FieldFrame = { label: string; error?: string[] | string; hint?: ReactNode; unit?: string };

function Frame({ id, label, error, hint, unit, children }: FieldFrame & { id: string; children: ReactNode }) {
  const messages = typeof error === "string" ? [error] : error;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium text-ink-900">
        {label}
        {unit ? <span className="ml-1 font-normal text-ink-600">({unit})</span> : null}
      </label>
      {children}
      {hint ? (
        <p id={`${id}-hint`} className="text-xs text-ink-600">
          {hint}
        </p>
      ) : null}
      {messages?.length ? (
        <p id={`${id}-error`} className="text-sm text-outlier" role="alert">
          {messages.join(" ")}
        </p>
      ) : null}
    </div>
  );
}

const controlClass =
  "w-full rounded-md border border-ink-900/20 bg-white px-3 py-2 text-base text-ink-950 shadow-sm aria-[invalid=true]:border-outlier";

function describedBy(id: string, { error, hint }: Pick<FieldFrame, "error" | "hint">) {
  return [hint ? `${id}-hint` : null, error?.length ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
}

export function TextField({ label, error, hint, unit, ...input }: FieldFrame & InputHTMLAttributes<HTMLInputElement>) {
  const id = useId();
  return (
    <Frame id={id} label={label} error={error} hint={hint} unit={unit}>
      <input id={id} className={controlClass} aria-invalid={error?.length ? true : undefined} aria-describedby={describedBy(id, { error, hint })} {...input} />
    </Frame>
  );
}

export function SelectField({ label, error, hint, children, ...select }: FieldFrame & SelectHTMLAttributes<HTMLSelectElement>) {
  const id = useId();
  return (
    <Frame id={id} label={label} error={error} hint={hint}>
      <select id={id} className={controlClass} aria-invalid={error?.length ? true : undefined} aria-describedby={describedBy(id, { error, hint })} {...select}>
        {children}
      </select>
    </Frame>
  );
}

export function TextAreaField({ label, error, hint, ...area }: FieldFrame & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  const id = useId();
  return (
    <Frame id={id} label={label} error={error} hint={hint}>
      <textarea id={id} className={controlClass} aria-invalid={error?.length ? true : undefined} aria-describedby={describedBy(id, { error, hint })} {...area} />
    </Frame>
  );
}

const buttonStyles = {
  primary: "bg-ink-800 text-paper-50 hover:bg-ink-700",
  secondary: "bg-white text-ink-900 ring-1 ring-ink-900/20 hover:bg-paper-100",
  danger: "bg-outlier text-white hover:opacity-90",
} as const;

export function Button({
  variant = "primary",
  className = "",
  ...button
}: { variant?: keyof typeof buttonStyles } & React.ButtonHTMLAttributes<HTMLButtonElement>) {
  return (
    <button
      className={`inline-flex items-center justify-center gap-2 rounded-md px-4 py-2 text-sm font-medium disabled:opacity-50 ${buttonStyles[variant]} ${className}`}
      {...button}
    />
  );
}

/** A message above a form: what went wrong as a whole, or what just succeeded. */
export function Notice({ tone, children }: { tone: "error" | "success" | "warning"; children: ReactNode }) {
  const styles = { error: "bg-red-50 text-outlier ring-outlier/30", success: "bg-emerald-50 text-consistent ring-consistent/30", warning: "bg-amber-50 text-amber-700 ring-amber-500/40" };
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`rounded-md px-4 py-3 text-sm ring-1 ${styles[tone]}`}>
      {children}
    </div>
  );
}
