/**
 * The instructor's hazard notes for a practical, always with the caution that local rules and the
 * supervising staff come first. Oscillab never adds handling instructions of its own.
 */
export const SAFETY_CAUTION = 'Local safety rules and the supervising staff take precedence over anything shown here.';

export function HazardNotes({ notes, headingLevel = 2 }: { notes: string; headingLevel?: 2 | 3 }) {
  const Heading = headingLevel === 2 ? 'h2' : 'h3';
  const text = notes.trim();
  return (
    <section aria-labelledby="hazard-notes-heading" className="rounded-card border-2 border-hazard-rule bg-hazard-bg p-4 text-hazard">
      <Heading id="hazard-notes-heading" className="mb-1 flex items-center gap-2">
        <span aria-hidden="true">⚠</span> Hazard notes
      </Heading>
      {text ? (
        <p className="whitespace-pre-line">{text}</p>
      ) : (
        <p className="italic">The instructor has not written hazard notes for this practical.</p>
      )}
      <p className="mt-2 text-sm font-bold">{SAFETY_CAUTION}</p>
    </section>
  );
}
