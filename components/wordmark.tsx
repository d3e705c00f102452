/** Oscillab's mark: a damped oscillation drawn on a rule line, beside the name. */
export function Wordmark() {
  return (
    <span className="flex items-center gap-2">
      <svg width="34" height="20" viewBox="0 0 34 20" aria-hidden="true" className="text-accent">
        <line x1="0" y1="10" x2="34" y2="10" stroke="currentColor" strokeOpacity="0.25" />
        <path
          d="M1 10 C 3 1, 5 1, 7 10 S 11 17, 13 10 S 16 5, 18 10 S 21 13.5, 23 10 S 25.5 8, 27 10 S 29.5 11, 33 10"
          fill="none"
          stroke="currentColor"
          strokeWidth="1.8"
          strokeLinecap="round"
        />
      </svg>
      <span className="text-lg font-bold tracking-tight">Oscillab</span>
    </span>
  );
}
