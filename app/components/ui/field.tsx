/**
 * Labelled form fields with their unit, hint and error next to them. Errors and hints are tied to the
 * control with aria-describedby so that screen readers announce them. `className` styles the wrapper;
 * `controlClassName` the control itself.
 */
import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from "react";

type FieldFrame = { label: string; error?: string | string[]; hint?: ReactNode; unit?: string; className?: string; controlClassName?: string };

const controlClass = "mt-1 block w-full rounded border bg-white px-3 py-2 text-base text-ink-950 shadow-sm focus:border-ink-500";

function messagesOf(error: FieldFrame["error"]): string[] {
  return typeof error === "string" ? [error] : (error ?? []);
}

/** The label, hint and error around any control; `render` gets the props that wire the control up. */
function Frame({
  label,
  error,
  hint,
  unit,
  className,
  controlClassName = "",
  render,
}: FieldFrame & { render: (control: { id: string; className: string; "aria-invalid"?: true; "aria-describedby"?: string }) => ReactNode }) {
  const id = useId();
  const messages = messagesOf(error);
  const describedBy = [hint ? `${id}-hint` : null, messages.length ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-sm font-medium text-ink-900">
        {label}
        {unit ? <span className="ml-1 font-normal text-ink-600">({unit})</span> : null}
      </label>
      {render({
        id,
        className: `${controlClass} ${messages.length ? "border-outlier" : "border-ink-900/20"} ${controlClassName}`,
        "aria-invalid": messages.length ? true : undefined,
        "aria-describedby": describedBy,
      })}
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-sm text-ink-600">
          {hint}
        </p>
      ) : null}
      {messages.length ? (
        <p id={`${id}-error`} className="mt-1 text-sm font-medium text-outlier">
          {messages.join(" ")}
        </p>
      ) : null}
    </div>
  );
}

export function TextField({ label, error, hint, unit, className, controlClassName, ...input }: FieldFrame & Omit<InputHTMLAttributes<HTMLInputElement>, "className">) {
  return <Frame {...{ label, error, hint, unit, className, controlClassName }} render={(control) => <input {...control} {...input} />} />;
}

export function SelectField({ label, error, hint, className, controlClassName, children, ...select }: FieldFrame & Omit<SelectHTMLAttributes<HTMLSelectElement>, "className">) {
  return (
    <Frame
      {...{ label, error, hint, className, controlClassName }}
      render={(control) => (
        <select {...control} {...select}>
          {children}
        </select>
      )}
    />
  );
}

export function TextAreaField({ label, error, hint, className, controlClassName, ...area }: FieldFrame & Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, "className">) {
  return <Frame {...{ label, error, hint, className, controlClassName }} render={(control) => <textarea {...control} {...area} />} />;
}
