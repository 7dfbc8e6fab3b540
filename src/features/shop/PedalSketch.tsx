/** A drawn stand-in while a model has no photo: an enclosure with two knobs and a footswitch. */
export function PedalSketch({ label }: { label: string }) {
  return (
    <div className="flex h-40 items-center justify-center bg-spruce-100">
      <svg viewBox="0 0 80 100" className="h-32" role="img" aria-label={`Drawing of the ${label} pedal (no photo yet)`}>
        <rect x="6" y="4" width="68" height="92" rx="8" fill="#1f5d47" />
        <circle cx="26" cy="26" r="9" fill="#f6f1e7" /><line x1="26" y1="26" x2="26" y2="18" stroke="#1f2a24" strokeWidth="2" />
        <circle cx="54" cy="26" r="9" fill="#f6f1e7" /><line x1="54" y1="26" x2="60" y2="21" stroke="#1f2a24" strokeWidth="2" />
        <circle cx="40" cy="50" r="3" fill="#d08a4e" />
        <circle cx="40" cy="76" r="9" fill="#b8c4be" stroke="#f6f1e7" strokeWidth="2" />
      </svg>
    </div>
  );
}
