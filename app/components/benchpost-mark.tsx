/** Benchpost's mark: a graduated column with its two timing bands and a sphere falling between them. */
export function BenchpostMark({ className = "h-8 w-8" }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true" focusable="false">
      <rect width="32" height="32" rx="7" className="fill-ink-800" />
      <path d="M11 5h10M12.5 5v20a3.5 3.5 0 0 0 7 0V5" fill="none" className="stroke-paper-50" strokeWidth="2" strokeLinecap="round" />
      <path d="M12.5 11h7M12.5 21h7" className="stroke-amber-400" strokeWidth="1.6" />
      <circle cx="16" cy="15.5" r="2.3" className="fill-amber-400" />
    </svg>
  );
}
