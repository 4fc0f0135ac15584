// The editor's working copy: local state that answers every keystroke at once, saved to the
// server (PATCH /api/designs/:id { draft }) a moment after typing stops, and flushed on demand
// before leaving for a screen that reads it from the server.
import { useCallback, useEffect, useRef, useState } from 'react';
import { describeError } from '@/lib/api/client';
import { useUpdateDesign } from '@/lib/queries/designs';
import { getIn, SECTION_DEFAULTS, setIn, type Draft, type SectionKey } from './designForm';

export const AUTOSAVE_MS = 700;

export type SaveState = { kind: 'saved' } | { kind: 'dirty' } | { kind: 'saving' } | { kind: 'failed'; message: string };

export function useDraft(designId: string, initial: Draft) {
  const [draft, setDraft] = useState<Draft>(initial);
  const [save, setSave] = useState<SaveState>({ kind: 'saved' });
  const update = useUpdateDesign(designId);
  const latest = useRef(draft);
  const dirty = useRef(false);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  // Parts switched off keep their values here, so switching them back on restores them.
  const stash = useRef<Partial<Record<string, unknown>>>({});

  const push = useCallback(async () => {
    if (timer.current) clearTimeout(timer.current);
    timer.current = null;
    if (!dirty.current) return;
    dirty.current = false;
    setSave({ kind: 'saving' });
    try {
      await update.mutateAsync({ draft: latest.current });
      setSave(dirty.current ? { kind: 'dirty' } : { kind: 'saved' });
    } catch (error) {
      dirty.current = true;
      setSave({ kind: 'failed', message: describeError(error) });
    }
  }, [update]);

  const change = useCallback(
    (next: Draft) => {
      latest.current = next;
      dirty.current = true;
      setDraft(next);
      setSave({ kind: 'dirty' });
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void push(), AUTOSAVE_MS);
    },
    [push],
  );

  useEffect(
    () => () => {
      // Leaving the editor: save what is pending.
      if (timer.current) clearTimeout(timer.current);
      if (dirty.current) void update.mutateAsync({ draft: latest.current }).catch(() => undefined);
    },
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [],
  );

  const setField = useCallback(
    (path: string, text: string) => change(setIn(latest.current, path, text.trim() === '' ? undefined : text)),
    [change],
  );

  const setSection = useCallback(
    (section: SectionKey, fitted: boolean) => {
      const current = getIn(latest.current, section);
      if (!fitted) {
        if (current != null) stash.current[section] = current;
        change(setIn(latest.current, section, null));
      } else {
        change(setIn(latest.current, section, stash.current[section] ?? SECTION_DEFAULTS[section] ?? {}));
      }
    },
    [change],
  );

  const setBypass = useCallback(
    (fitted: boolean) => {
      const current = getIn(latest.current, 'precharge.bypass');
      if (!fitted) {
        if (current != null) stash.current['precharge.bypass'] = current;
        change(setIn(latest.current, 'precharge.bypass', null));
      } else {
        change(
          setIn(latest.current, 'precharge.bypass', stash.current['precharge.bypass'] ?? { when: 'voltage', fraction: 0.95 }),
        );
      }
    },
    [change],
  );

  const setBypassMode = useCallback(
    (mode: 'voltage' | 'time') => {
      let next = setIn(latest.current, 'precharge.bypass.when', mode);
      if (mode === 'time' && getIn(next, 'precharge.bypass.time') === undefined)
        next = setIn(next, 'precharge.bypass.time', '100 ms');
      change(next);
    },
    [change],
  );

  const setLoadKind = useCallback(
    (kind: 'none' | 'resistance' | 'current' | 'power') => {
      const current = getIn(latest.current, 'load') as Draft | null | undefined;
      if (kind === 'none') {
        if (current) stash.current.load = current;
        change(setIn(latest.current, 'load', null));
        return;
      }
      const base = (current ?? (stash.current.load as Draft | undefined) ?? {}) as Draft;
      const value = base.kind === kind ? base.value : kind === 'resistance' ? '100 Ω' : kind === 'current' ? '5 A' : '1.2 kW';
      change({ ...latest.current, load: { ...base, kind, value } });
    },
    [change],
  );

  /** Replaces one value from elsewhere (the precharge sizing's "use this value"). */
  const setValue = useCallback((path: string, value: unknown) => change(setIn(latest.current, path, value)), [change]);

  return { draft, save, flush: push, setField, setSection, setBypass, setBypassMode, setLoadKind, setValue };
}
