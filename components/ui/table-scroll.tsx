/**
 * A wide table in its own horizontally scrolling box, named for assistive technology and reachable
 * with the keyboard (so it can be scrolled without a mouse), so the page itself never scrolls sideways.
 */
export function TableScroll({ label, children, className = '' }: { label: string; children: React.ReactNode; className?: string }) {
  return (
    <div className={`table-scroll ${className}`} role="region" aria-label={label} tabIndex={0}>
      {children}
    </div>
  );
}
