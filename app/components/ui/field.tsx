/**
 * Labelled form fields with their unit, hint and error next to them. Errors and hints are tied to the
 * control with aria-describedby so that screen readers announce them. `className` styles the wrapper;
 * `controlClassName` the control itself.
 *
 * On a Conform form, pass the field's metadata as `field`: it names the control, gives it what was
 * typed last (from the server's reply too, so that nothing is lost without JavaScript) and its errors.
 */
import type { FieldMetadata } from "@conform-to/react";
import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from "react";

type FieldFrame = {
  label: string;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- a field of any form's schema
  field?: FieldMetadata<any, any, string[]>;
  error?: string | string[];
  hint?: ReactNode;
  unit?: string;
  className?: string;
  controlClassName?: string;
};

type ControlProps = {
  id: string;
  className: string;
  name?: string;
  defaultValue?: string;
  "aria-invalid"?: true;
  "aria-describedby"?: string;
};

const controlClass = "mt-1 block w-full rounded border bg-white px-3 py-2 text-base text-ink-950 shadow-sm focus:border-ink-500";

function messagesOf(error: FieldFrame["error"]): string[] {
  return typeof error === "string" ? [error] : (error ?? []);
}

/** The label, hint and error around any control; `render` gets the props that wire the control up. */
function Frame({
  label,
  field,
  error,
  hint,
  unit,
  className,
  controlClassName = "",
  controlled = false,
  render,
}: FieldFrame & { controlled?: boolean; render: (control: ControlProps) => ReactNode }) {
  const ownId = useId();
  const id = field?.id ?? ownId;
  const hintId = field?.descriptionId ?? `${id}-hint`;
  const errorId = field?.errorId ?? `${id}-error`;
  const messages = field ? (field.errors ?? []) : messagesOf(error);
  const describedBy = [hint ? hintId : null, messages.length ? errorId : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-sm font-medium text-ink-900">
        {label}
        {unit ? <span className="ml-1 font-normal text-ink-600">({unit})</span> : null}
      </label>
      {render({
        id,
        // A control the page holds the value of (`value`) takes no default: React allows one or the other.
        ...(field
          ? {
              name: field.name,
              ...(controlled ? {} : { defaultValue: typeof field.initialValue === "string" ? field.initialValue : undefined }),
            }
          : {}),
        className: `${controlClass} ${messages.length ? "border-outlier" : "border-ink-900/20"} ${controlClassName}`,
        "aria-invalid": messages.length ? true : undefined,
        "aria-describedby": describedBy,
      })}
      {hint ? (
        <p id={hintId} className="mt-1 text-sm text-ink-600">
          {hint}
        </p>
      ) : null}
      {messages.length ? (
        <p id={errorId} className="mt-1 text-sm font-medium text-outlier">
          {messages.join(" ")}
        </p>
      ) : null}
    </div>
  );
}

export function TextField({
  label,
  field,
  error,
  hint,
  unit,
  className,
  controlClassName,
  ...input
}: FieldFrame & Omit<InputHTMLAttributes<HTMLInputElement>, "className">) {
  return (
    <Frame
      {...{ label, field, error, hint, unit, className, controlClassName }}
      controlled={input.value !== undefined}
      render={(control) => <input {...control} {...input} />}
    />
  );
}

export function SelectField({
  label,
  field,
  error,
  hint,
  className,
  controlClassName,
  children,
  ...select
}: FieldFrame & Omit<SelectHTMLAttributes<HTMLSelectElement>, "className">) {
  return (
    <Frame
      {...{ label, field, error, hint, className, controlClassName }}
      controlled={select.value !== undefined}
      render={(control) => (
        <select {...control} {...select}>
          {children}
        </select>
      )}
    />
  );
}

export function TextAreaField({
  label,
  field,
  error,
  hint,
  className,
  controlClassName,
  ...area
}: FieldFrame & Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, "className">) {
  return (
    <Frame
      {...{ label, field, error, hint, className, controlClassName }}
      controlled={area.value !== undefined}
      render={(control) => <textarea {...control} {...area} />}
    />
  );
}
