'use client';
import { create } from 'zustand';
import { persist } from 'zustand/middleware';

/** UI choices that outlive a page load: the outbreak in view and the last site used for entry. */
interface UiState {
  outbreakId: string | null;
  lastSiteId: string | null;
  setOutbreak: (id: string | null) => void;
  setLastSite: (id: string | null) => void;
}

export const useUiStore = create<UiState>()(
  persist(
    (set) => ({
      outbreakId: null,
      lastSiteId: null,
      setOutbreak: (outbreakId) => set({ outbreakId }),
      setLastSite: (lastSiteId) => set({ lastSiteId }),
    }),
    { name: 'ebbcast.ui' },
  ),
);
