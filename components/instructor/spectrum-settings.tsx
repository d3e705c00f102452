'use client';
/**
 * Spectra of a practical, for the instructor: one spectrum holding every molecule (the default)
 * or one spectrum per sample, the bands expected in each, and the switch for the third
 * comparison — Oscillab's own reading of the student's spectrum on the marking screen and in
 * the feedback.
 */
import { useState } from 'react';
import { api, useApi } from '@/lib/api-client';
import type { SpectrumSettingsView } from '@/lib/instructor/spectrum-settings';

type Settings = SpectrumSettingsView;
type Sample = Settings['effective'][number];
type Band = Sample['bands'][number];
/** A sample as edited: the molecules as typed, read into a list only when saved. */
type EditedSample = Omit<Sample, 'molecules'> & { moleculesText: string };

const edited = (s: Sample): EditedSample => ({ key: s.key, label: s.label, bands: s.bands, moleculesText: s.molecules.join(', ') });
const toSample = (s: EditedSample): Sample => ({
  key: s.key,
  label: s.label,
  bands: s.bands,
  molecules: s.moleculesText.split(/[,;\s]+/).filter(Boolean),
});

const BAND_WORDS: Record<Band, string> = { fundamental: 'fundamental (1←0)', overtone: 'first overtone (2←0)' };

export function SpectrumSettings({ practicalId }: { practicalId: number }) {
  const [settings, setSettings] = useState<Settings | null>(null);
  const [perSample, setPerSample] = useState(false);
  const [samples, setSamples] = useState<EditedSample[]>([]);
  const [analysis, setAnalysis] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);

  // Read once: the form then holds the instructor's edits, which a revalidation must not overwrite.
  const loaded = useApi<Settings>(`/api/practicals/${practicalId}/spectrum-settings`, {
    revalidateIfStale: false,
    revalidateOnFocus: false,
    revalidateOnReconnect: false,
    onSuccess: (data) => {
      setSettings(data);
      setAnalysis(data.spectrumAnalysis);
      setPerSample(data.samples !== null);
      setSamples((data.samples ?? data.effective).map(edited));
    },
  });
  const problem = error ?? loaded.error?.message ?? null;

  const save = async () => {
    setSaving(true);
    setError(null);
    setMessage(null);
    const r = await api.put<Settings>(`/api/practicals/${practicalId}/spectrum-settings`, {
      spectrumAnalysis: analysis,
      samples: perSample ? samples.map(toSample) : null,
    });
    setSaving(false);
    if (!r.ok) {
      setError(r.error.message);
      return;
    }
    setSettings(r.data);
    setSamples((r.data.samples ?? r.data.effective).map(edited));
    setMessage('Saved. The new settings apply to spectra uploaded and submissions checked from now on.');
  };

  if (!settings && !problem)
    return (
      <section className="card mt-6">
        <p className="text-ink-soft">Loading the spectrum settings…</p>
      </section>
    );
  return (
    <section className="card mt-6 space-y-4" aria-labelledby="spectra-settings-heading">
      <h2 id="spectra-settings-heading">Spectra</h2>
      <fieldset>
        <legend className="label">What students upload</legend>
        <label className="flex items-center gap-2">
          <input
            type="radio"
            name="spectrum-mode"
            checked={!perSample}
            onChange={() => {
              setPerSample(false);
              if (settings) setSamples(settings.effective.map(edited));
            }}
          />
          One spectrum holding every molecule of the practical
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="spectrum-mode" checked={perSample} onChange={() => setPerSample(true)} />
          One spectrum per sample
        </label>
      </fieldset>
      {!perSample && settings && (
        <p className="hint">
          Expected:{' '}
          {settings.effective.map((s) => `${s.molecules.join(' and ')} — ${s.bands.map((b) => BAND_WORDS[b]).join(', ')}`).join('; ')} (the
          overtone when a quantity needs it).
        </p>
      )}
      {perSample && <SampleList samples={samples} setSamples={setSamples} />}
      <ThirdComparison checked={analysis} onChange={setAnalysis} />
      <div className="flex items-center gap-3">
        <button type="button" className="btn" onClick={() => void save()} disabled={saving}>
          {saving ? 'Saving…' : 'Save spectrum settings'}
        </button>
        <span aria-live="polite" className="text-sm">
          {message}
          {problem && <span className="error-text">{problem}</span>}
        </span>
      </div>
    </section>
  );
}

/** The spectra of a practical taken sample by sample: one editor each, and at most six. */
function SampleList({
  samples,
  setSamples,
}: {
  samples: EditedSample[];
  setSamples: React.Dispatch<React.SetStateAction<EditedSample[]>>;
}) {
  const update = (i: number, patch: Partial<EditedSample>) => setSamples((list) => list.map((s, k) => (k === i ? { ...s, ...patch } : s)));
  return (
    <div className="space-y-3">
      {samples.map((s, i) => (
        <SampleEditor
          key={i}
          index={i}
          sample={s}
          update={(patch) => update(i, patch)}
          remove={() => setSamples((list) => list.filter((_, k) => k !== i))}
          canRemove={samples.length > 1}
        />
      ))}
      <button
        type="button"
        className="btn-quiet"
        onClick={() =>
          setSamples((list) => [
            ...list,
            { key: `sample-${list.length + 1}`, label: `Sample ${list.length + 1}`, moleculesText: '', bands: ['fundamental'] },
          ])
        }
        disabled={samples.length >= 6}
      >
        Add a spectrum
      </button>
    </div>
  );
}

/** One spectrum of a practical taken sample by sample: its name, short name, molecules and expected bands. */
function SampleEditor({
  index: i,
  sample: s,
  update,
  remove,
  canRemove,
}: {
  index: number;
  sample: EditedSample;
  update: (patch: Partial<EditedSample>) => void;
  remove: () => void;
  canRemove: boolean;
}) {
  return (
    <div className="grid gap-2 rounded border border-rule p-3 md:grid-cols-4">
      <div>
        <label className="hint" htmlFor={`sample-label-${i}`}>
          Spectrum
        </label>
        <input id={`sample-label-${i}`} className="field" value={s.label} onChange={(e) => update({ label: e.target.value })} />
      </div>
      <div>
        <label className="hint" htmlFor={`sample-key-${i}`}>
          Short name (a–z, 0–9, -)
        </label>
        <input id={`sample-key-${i}`} className="field" value={s.key} onChange={(e) => update({ key: e.target.value.toLowerCase() })} />
      </div>
      <div>
        <label className="hint" htmlFor={`sample-molecules-${i}`}>
          Molecules in it (e.g. HCl, DCl)
        </label>
        <input
          id={`sample-molecules-${i}`}
          className="field"
          value={s.moleculesText}
          onChange={(e) => update({ moleculesText: e.target.value })}
        />
      </div>
      <fieldset>
        <legend className="hint">Bands expected</legend>
        {(['fundamental', 'overtone'] as Band[]).map((b) => (
          <label key={b} className="flex items-center gap-2 text-sm">
            <input
              type="checkbox"
              checked={s.bands.includes(b)}
              onChange={(e) => update({ bands: e.target.checked ? [...s.bands, b] : s.bands.filter((x) => x !== b) })}
            />
            {BAND_WORDS[b]}
          </label>
        ))}
      </fieldset>
      <div className="md:col-span-4">
        <button type="button" className="btn-quiet" onClick={remove} disabled={!canRemove}>
          Remove this spectrum
        </button>
      </div>
    </div>
  );
}

/** The switch for the third comparison, with what it does and that its verdicts are advice only. */
function ThirdComparison({ checked, onChange }: { checked: boolean; onChange: (on: boolean) => void }) {
  return (
    <label className="flex items-start gap-2">
      <input type="checkbox" className="mt-1" checked={checked} onChange={(e) => onChange(e.target.checked)} />
      <span>
        Show Oscillab’s own reading of each student’s spectrum as a third comparison, “from your spectrum”, on the marking screen and in the
        feedback.
        <span className="hint block">
          It finds, assigns and fits the lines of the uploaded spectrum itself and compares the student’s numbers with the result: it
          catches misread or misnumbered lines. Its verdicts are advice and do not change marks.
        </span>
      </span>
    </label>
  );
}
