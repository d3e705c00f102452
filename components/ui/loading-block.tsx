/** A quiet placeholder while a page's data is read: announced once, drawn as grey bars in the page's shape. */
export function LoadingBlock({ label, rows = 4 }: { label: string; rows?: number }) {
  return (
    <div role="status" aria-live="polite" className="space-y-4">
      <p className="text-ink-soft">{label}</p>
      <div aria-hidden="true" className="card space-y-3">
        <div className="h-5 w-2/5 animate-pulse rounded bg-paper-sunk" />
        {Array.from({ length: rows }, (_, i) => (
          <div key={i} className="h-4 animate-pulse rounded bg-paper-sunk" style={{ width: `${92 - ((i * 17) % 35)}%` }} />
        ))}
      </div>
    </div>
  );
}
