/** Kneepoint's mark: the knee of a diode's I–V curve, with the operating point on it. */
export function Logo({ size = 36 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden focusable="false">
      <rect width="32" height="32" rx="7" fill="#2b3b35" />
      <path d="M5 25 H17 C21 25 22 22 23.5 16 C24.5 11 25.5 7 27 5" fill="none" stroke="#e3a53a" strokeWidth="3" strokeLinecap="round" />
      <circle cx="21.6" cy="21" r="2.6" fill="#c0602f" />
    </svg>
  );
}
