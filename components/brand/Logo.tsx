/** Partwise mark: three overlapping soft discs, one per "part" of a mixture. */
export function Logo({ className = '' }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-display text-xl font-bold text-ink ${className}`}>
      <svg aria-hidden="true" width="28" height="28" viewBox="0 0 28 28">
        <circle cx="10" cy="11" r="7" fill="#3a8a74" fillOpacity="0.85" />
        <circle cx="18" cy="11" r="7" fill="#e0a526" fillOpacity="0.8" />
        <circle cx="14" cy="18" r="7" fill="#b8432f" fillOpacity="0.7" />
      </svg>
      Partwise
    </span>
  );
}
