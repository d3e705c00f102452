/**
 * A value and its note (an uncertainty "± 0.3 cm⁻¹", a percentage "(+0.0012 %)") as two pieces
 * that never break inside, so a number never parts from its unit. The note follows on the same
 * line when there is room, or always on a line of its own in quieter ink (`below`). Always one
 * element: a stacked table row on a phone gives each child of a cell a grid cell of its own.
 */
export function ValueNote({ value, note, below = false }: { value: string; note?: string | null; below?: boolean }) {
  if (!note) return <span className="nowrap">{value}</span>;
  return (
    <span>
      <span className="nowrap">{value}</span>
      {below ? (
        <span className="nowrap block text-ink-soft">{note}</span>
      ) : (
        <>
          {' '}
          <span className="nowrap">{note}</span>
        </>
      )}
    </span>
  );
}

/** Text split where its note begins (`marker`, e.g. " ± " or " ("): the note keeps the marker's visible part. */
export function splitNote(text: string, marker: string): { value: string; note: string | null } {
  const at = text.indexOf(marker);
  return at < 0 ? { value: text, note: null } : { value: text.slice(0, at), note: text.slice(at + 1) };
}
