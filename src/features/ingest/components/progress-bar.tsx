/** A labelled progress bar; `fraction` is 0–1. */
export function ProgressBar({
  fraction,
  label,
}: {
  fraction: number;
  label: string;
}) {
  const percent = Math.round(Math.min(1, Math.max(0, fraction)) * 100);
  return (
    <div
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={percent}
      className="h-2 w-full overflow-hidden rounded-full bg-slate-200"
    >
      <div
        className="h-full rounded-full bg-lamina-600 transition-[width] duration-150"
        style={{ width: `${percent}%` }}
      />
    </div>
  );
}
