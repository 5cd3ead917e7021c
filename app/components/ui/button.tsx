import type { ComponentProps } from "react";
import { Link, type LinkProps } from "react-router";

const variants = {
  primary: "bg-ink-800 text-paper-50 hover:bg-ink-700",
  secondary: "bg-white text-ink-900 ring-1 ring-ink-800 hover:bg-paper-100",
  danger: "bg-white text-outlier ring-1 ring-outlier hover:bg-paper-100",
} as const;

const base = "inline-flex items-center justify-center rounded px-4 py-2 text-sm font-medium";

export function Button({ variant = "primary", className = "", ...button }: ComponentProps<"button"> & { variant?: keyof typeof variants }) {
  return <button className={`${base} disabled:opacity-60 ${variants[variant]} ${className}`} {...button} />;
}

/** A link that starts a task (a form, a new page), drawn like a button. */
export function ButtonLink({ variant = "primary", className = "", ...link }: LinkProps & { variant?: keyof typeof variants }) {
  return <Link className={`${base} ${variants[variant]} ${className}`} {...link} />;
}
