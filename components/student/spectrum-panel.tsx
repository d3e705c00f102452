'use client';
/**
 * The spectrum part of the student's form: one upload per spectrum the practical takes (one cell
 * holding several bands, or one per sample), the spectrum drawn with the student's lines, what
 * Oscillab found in it band by band, the student's lines counted per isotopologue and band (saying
 * plainly when a band is outside the uploaded range), and "take the lines from my spectrum", which
 * fills the line lists for the student to confirm or edit.
 */
import { useState } from 'react';
import { api, useApi } from '@/lib/api-client';
import type { SpectrumFigureAnswer } from '@/lib/submissions/spectrum-figure';
import type { SpectrumLinesAnswer } from '@/lib/submissions/spectrum-analysis';
import type { UploadAccepted } from '@/lib/submissions/uploads';
import { PlotFigure } from '@/components/plots/plot-figure';

export interface PanelSample {
  key: string;
  label: string;
  /** "HCl and DCl: fundamental (1←0), first overtone (2←0)" */
  holds: string;
}

type Taken = SpectrumLinesAnswer;

interface Props {
  draftId: number | null;
  version: number;
  samples: PanelSample[];
  uploaded: Record<string, string | null>;
  /** Saves the draft when it has no row yet; the draft's id, or null when it could not be saved. */
  ensureDraft: () => Promise<number | null>;
  onUploaded: (upload: { sample: string; id: number; version: number; first: boolean }) => void;
  /** Puts line-list text into the form for each isotopologue. */
  onUseLines: (texts: Record<string, string>) => void;
}

/** The first spectrum's input keeps the id it always had. */
const fileId = (key: string, i: number) => (i === 0 ? 'spectrum-file' : `spectrum-file-${key}`);

const range = (lines: { branch: string; J: number }[]) => {
  const p = lines.filter((l) => l.branch === 'P').map((l) => l.J);
  const r = lines.filter((l) => l.branch === 'R').map((l) => l.J);
  const parts: string[] = [];
  if (p.length) parts.push(`P(${Math.min(...p)})–P(${Math.max(...p)})`);
  if (r.length) parts.push(`R(${Math.min(...r)})–R(${Math.max(...r)})`);
  return parts.join(', ');
};

export function SpectrumPanel(props: Props) {
  const [names, setNames] = useState(props.uploaded);
  const [messages, setMessages] = useState<Record<string, string>>({});
  const [shown, setShown] = useState<string>(props.samples.find((s) => props.uploaded[s.key])?.key ?? props.samples[0]?.key ?? '');
  const [taken, setTaken] = useState<Taken | null>(null);
  const [takeError, setTakeError] = useState<string | null>(null);
  const [taking, setTaking] = useState(false);
  const anyUploaded = Object.values(names).some(Boolean);
  const figure = useApi<SpectrumFigureAnswer>(
    props.draftId && names[shown] ? `/api/submissions/${props.draftId}/spectrum?sample=${shown}&v=${props.version}` : null,
    { keepPreviousData: true },
  );

  const upload = async (sample: PanelSample, file: File | undefined) => {
    if (!file) return;
    setMessages((m) => ({ ...m, [sample.key]: `Uploading ${file.name}…` }));
    const id = props.draftId ?? (await props.ensureDraft());
    if (!id) return;
    const fd = new FormData();
    fd.set('submissionId', String(id));
    fd.set('kind', 'spectrum');
    fd.set('sample', sample.key);
    fd.set('file', file);
    const r = await api.post<UploadAccepted>('/api/uploads', fd);
    if (!r.ok) {
      setMessages((m) => ({ ...m, [sample.key]: `Not accepted: ${r.error.message}` }));
      return;
    }
    const body = r.data;
    props.onUploaded({ sample: sample.key, id: body.id, version: body.version, first: sample.key === props.samples[0].key });
    setNames((n) => ({ ...n, [sample.key]: body.originalName }));
    setShown(sample.key);
    setTaken(null);
    setMessages((m) => ({
      ...m,
      [sample.key]: `Uploaded ${body.originalName}.${body.warnings?.length ? ` ${body.warnings.join(' ')}` : ''}`,
    }));
  };

  const take = async () => {
    if (!props.draftId) return;
    setTaking(true);
    setTakeError(null);
    const r = await api.get<Taken>(`/api/submissions/${props.draftId}/spectrum-lines`);
    setTaking(false);
    if (r.ok) setTaken(r.data);
    else setTakeError(r.error.message);
  };

  const use = () => {
    if (!taken) return;
    const texts: Record<string, string> = {};
    for (const [sp, t] of Object.entries(taken.species)) if (t.count > 0) texts[sp] = t.text;
    props.onUseLines(texts);
    setTaken(null);
  };

  const fig = figure.data;
  return (
    <div className="space-y-4" data-testid="spectrum-panel">
      {props.samples.map((s, i) => (
        <div key={s.key}>
          <label className="label" htmlFor={fileId(s.key, i)}>
            {props.samples.length > 1 ? `Spectrum: ${s.label}` : 'Spectrum'} (JCAMP-DX .jdx/.dx, or two-column CSV)
          </label>
          <p className="hint" id={`spectrum-holds-${s.key}`}>
            Expected in it: {s.holds}.
          </p>
          <input
            id={fileId(s.key, i)}
            type="file"
            accept=".jdx,.dx,.jcamp,.csv,.txt"
            aria-describedby={`spectrum-holds-${s.key}`}
            onChange={(e) => void upload(s, e.target.files?.[0])}
          />
          <p className="hint" aria-live="polite">
            {messages[s.key] ?? (names[s.key] ? `Current: ${names[s.key]}` : 'No spectrum uploaded yet.')}
          </p>
        </div>
      ))}

      {props.samples.length > 1 && anyUploaded && (
        <div role="group" aria-label="Spectrum shown" className="flex flex-wrap gap-2">
          {props.samples.map((s) => (
            <button
              key={s.key}
              type="button"
              className={s.key === shown ? 'btn' : 'btn-quiet'}
              aria-pressed={s.key === shown}
              disabled={!names[s.key]}
              onClick={() => setShown(s.key)}
            >
              {s.label}
            </button>
          ))}
        </div>
      )}

      {fig && (
        <figure className="mt-2">
          <div
            className="table-scroll text-ink"
            role="region"
            aria-label="Your spectrum with your lines (scrolls sideways on a narrow screen)"
            tabIndex={0}
            data-testid="spectrum-plot"
          >
            <PlotFigure {...fig.plot} />
          </div>
          <figcaption className="hint">Your lines are drawn over your spectrum; hollow markers match no peak.</figcaption>
        </figure>
      )}
      {figure.error && <p className="error-text">The plot could not be drawn: {figure.error.message}</p>}

      {fig && fig.bands.length > 0 && (
        <section aria-labelledby="found-heading" className="text-sm">
          <h3 id="found-heading" className="text-base">
            What Oscillab found in this spectrum
          </h3>
          <ul className="mt-1 list-disc pl-5" data-testid="bands-found">
            {fig.bands.map((b, i) => (
              <li key={i}>{b}</li>
            ))}
          </ul>
        </section>
      )}

      {fig && fig.perBand.length > 0 && (
        <section aria-labelledby="match-heading" className="text-sm">
          <h3 id="match-heading" className="text-base">
            Your lines against your spectrum, band by band
          </h3>
          <ul className="mt-1 space-y-1" data-testid="match-summary">
            {fig.perBand.map((b, i) => (
              <li key={i} className={b.outsideRange || b.noSpectrum ? 'text-danger' : b.matched < b.reported ? '' : 'text-ink'}>
                <span aria-hidden="true">{b.outsideRange || b.noSpectrum ? '✗ ' : b.matched === b.reported ? '✓ ' : '◐ '}</span>
                {b.message}
              </li>
            ))}
          </ul>
        </section>
      )}

      <TakeLines
        anyUploaded={anyUploaded}
        taking={taking}
        takeError={takeError}
        taken={taken}
        onTake={() => void take()}
        onUse={use}
        onDiscard={() => setTaken(null)}
      />
    </div>
  );
}

/** "Take the lines from my spectrum": what was found per isotopologue, to use or discard. */
function TakeLines({
  anyUploaded,
  taking,
  takeError,
  taken,
  onTake,
  onUse,
  onDiscard,
}: {
  anyUploaded: boolean;
  taking: boolean;
  takeError: string | null;
  taken: Taken | null;
  onTake: () => void;
  onUse: () => void;
  onDiscard: () => void;
}) {
  return (
    <div className="rounded border border-rule bg-paper-sunk p-3 text-sm">
      <p>
        Oscillab can read the lines of your spectrum for you: it finds the lines, assigns branch and J, and puts them in your line lists,
        where you check them and change what you disagree with.
      </p>
      <button type="button" className="btn-quiet mt-2" onClick={onTake} disabled={!anyUploaded || taking}>
        {taking ? 'Reading your spectrum…' : 'Take the lines from my spectrum'}
      </button>
      {takeError && (
        <p className="error-text" role="alert">
          {takeError}
        </p>
      )}
      {taken && (
        <div className="mt-3 space-y-2" aria-live="polite" data-testid="taken-lines">
          <ul className="list-disc pl-5">
            {Object.entries(taken.species).map(([sp, t]) => (
              <li key={sp}>
                {t.display}: {t.count ? `${t.count} lines of the fundamental (1←0), ${range(t.lines)}` : 'no lines found in your spectrum'}
              </li>
            ))}
          </ul>
          {taken.problems.map((p, i) => (
            <p key={i} className="text-ink-soft">
              {p}
            </p>
          ))}
          <p className="text-ink-soft">Using them replaces what is in those line lists now.</p>
          <div className="flex gap-2">
            <button type="button" className="btn" onClick={onUse} disabled={!Object.values(taken.species).some((t) => t.count > 0)}>
              Use these lines
            </button>
            <button type="button" className="btn-quiet" onClick={onDiscard}>
              Discard
            </button>
          </div>
        </div>
      )}
    </div>
  );
}
