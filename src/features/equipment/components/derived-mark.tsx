/** Marks a value Lamella worked out from others rather than one entered. */
export function DerivedMark() {
  return (
    <span
      className="ml-1 rounded bg-lamina-100 px-1.5 py-0.5 text-[0.65rem] font-semibold uppercase tracking-wide text-lamina-800"
      title="Derived from the other construction values"
    >
      derived
    </span>
  );
}
