/**
 * A thin progress bar in the theme's accent colour (a native <progress> is drawn differently by
 * every browser). Pass `value` as a fraction 0..1, or null while the amount is not known.
 */
export function ProgressBar({ value, label }: { value: number | null; label: string }) {
  const pct = value === null ? null : Math.max(0, Math.min(100, Math.round(value * 100)));
  return (
    <div
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={pct ?? undefined}
      className="h-2 w-full overflow-hidden rounded-full bg-[var(--color-accent-soft)]"
    >
      <div
        className={`h-full rounded-full bg-[var(--color-accent)] transition-[width] duration-300 ${pct === null ? 'w-1/3 animate-pulse' : ''}`}
        style={pct === null ? undefined : { width: `${pct}%` }}
      />
    </div>
  );
}
