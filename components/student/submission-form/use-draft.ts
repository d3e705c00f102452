'use client';
/**
 * The draft behind the student's form: saved a second and a half after the last change, and on
 * demand (before an upload needs its row, before a check or a submission). Keeps the draft's id
 * and version; `settle()` cancels a pending autosave and waits for one under way.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import type { Draft } from '@/lib/schemas/submission';
import type { DraftSaved } from '@/lib/submissions/service';
import { api } from '@/lib/api-client';

export type SaveState = 'idle' | 'saving' | 'saved' | 'error';

export function useDraft(form: UseFormReturn<Draft>, practicalId: number, initial: { id: number | null; version: number }) {
  const { getValues, watch } = form;
  const [draftId, setDraftId] = useState(initial.id);
  const versionRef = useRef(initial.version);
  const [version, setVersionState] = useState(initial.version);
  const [saveState, setSaveState] = useState<SaveState>('idle');
  const [saveError, setSaveError] = useState<string | null>(null);
  const inFlight = useRef<Promise<unknown> | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  /** The version the next submit must name: the ref for the request, the state for the screen. */
  const setVersion = useCallback((v: number) => {
    versionRef.current = v;
    setVersionState(v);
  }, []);

  const save = useCallback(async () => {
    setSaveState('saving');
    const run = (async () => {
      const r = await api.put<DraftSaved>('/api/submissions/draft', { practicalId, draft: getValues() });
      if (!r.ok) {
        setSaveState('error');
        setSaveError(r.error.message);
        return null;
      }
      setDraftId(r.data.id);
      setVersion(r.data.version);
      setSaveState('saved');
      setSaveError(null);
      return r.data.id;
    })();
    inFlight.current = run;
    try {
      return await run;
    } finally {
      if (inFlight.current === run) inFlight.current = null;
    }
  }, [getValues, practicalId, setVersion]);

  // Autosave: a second and a half after the last change.
  useEffect(() => {
    const sub = watch(() => {
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void save(), 1500);
    });
    return () => {
      sub.unsubscribe();
      if (timer.current) clearTimeout(timer.current);
    };
  }, [watch, save]);

  const settle = useCallback(async () => {
    if (timer.current) clearTimeout(timer.current);
    if (inFlight.current) await inFlight.current;
  }, []);

  return { draftId, version, versionRef, setVersion, saveState, saveError, save, settle };
}

export type DraftHandle = ReturnType<typeof useDraft>;
