import type { ButtonHTMLAttributes } from "react";

const variants = {
  primary: "bg-ink-800 text-paper-50 hover:bg-ink-700",
  secondary: "bg-white text-ink-900 ring-1 ring-ink-800 hover:bg-paper-100",
  danger: "bg-white text-outlier ring-1 ring-outlier hover:bg-paper-100",
} as const;

export function Button({ variant = "primary", className = "", ...button }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: keyof typeof variants }) {
  return (
    <button
      className={`inline-flex items-center justify-center rounded px-4 py-2 text-sm font-medium disabled:opacity-60 ${variants[variant]} ${className}`}
      {...button}
    />
  );
}
