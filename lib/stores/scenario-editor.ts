'use client';
/**
 * The scenario screen's draft (a ScenarioInput being edited) and the saved scenario it came from.
 * Kept in localStorage per device so that a navigation or a reload offline does not lose an edit.
 */
import { create } from 'zustand';
import { persist } from 'zustand/middleware';
import type { ScenarioInput } from '@/lib/model';

export interface EnsembleSettings {
  /** R0 from … to (varies β at the chosen infectious period). */
  R0: [number, number];
  /** Infectious period from … to, days (varies γ). */
  infectiousPeriod: [number, number];
  /** Contact reduction of the first intervention from … to, fraction; used when it exists. */
  contactReduction: [number, number];
  /** Runs. */
  runs: number;
}

export interface ScenarioEditorState {
  draft: ScenarioInput;
  /** Saved scenario loaded into the editor: id, version (for baseVersion) and name. */
  saved: { id: string; version: number; name: string } | null;
  /** The outbreak whose defaults filled the draft (population, beds). */
  outbreakId: string | null;
  ensemble: EnsembleSettings;
  setDraft: (draft: ScenarioInput) => void;
  update: (fn: (d: ScenarioInput) => ScenarioInput) => void;
  setSaved: (saved: ScenarioEditorState['saved']) => void;
  setEnsemble: (e: Partial<EnsembleSettings>) => void;
  reset: (outbreak: { id: string | null; population?: number; beds?: number | null }) => void;
}

/** A plain influenza-like start: R0 1.8, 3-day infectious period, RK4 at a quarter day, half a year. */
export function defaultDraft(population = 10_000, beds: number | null = null): ScenarioInput {
  return {
    model: 'SIR',
    population,
    initial: { I: 5 },
    params: { beta: 0.6, gamma: 1 / 3 },
    interventions: [],
    capacity: { admissionFraction: 0.02, lengthOfStay: 5, beds: beds ?? Math.max(1, Math.round(population / 300)) },
    method: 'rk4',
    step: 0.25,
    days: 120,
  };
}

const DEFAULT_ENSEMBLE: EnsembleSettings = { R0: [1.5, 2.2], infectiousPeriod: [2.5, 3.5], contactReduction: [0.2, 0.5], runs: 1000 };

export const useScenarioEditor = create<ScenarioEditorState>()(
  persist(
    (set) => ({
      draft: defaultDraft(),
      saved: null,
      outbreakId: null,
      ensemble: DEFAULT_ENSEMBLE,
      setDraft: (draft) => set({ draft }),
      update: (fn) => set((s) => ({ draft: fn(s.draft) })),
      setSaved: (saved) => set({ saved }),
      setEnsemble: (e) => set((s) => ({ ensemble: { ...s.ensemble, ...e } })),
      reset: (o) => set({ draft: defaultDraft(o.population, o.beds ?? null), saved: null, outbreakId: o.id, ensemble: DEFAULT_ENSEMBLE }),
    }),
    { name: 'ebbcast.scenario-editor', version: 1 },
  ),
);
