'use client';
import { useEffect } from 'react';
import { useSearchParams } from 'next/navigation';
import { useUiStore } from '@/lib/stores/ui';

/**
 * The outbreak in view: `?outbreak=` in the address wins (links and bookmarks), else the one last
 * chosen on this device. Static shells read it on the client, so one cached page serves them all.
 */
export function useOutbreakId(): string | null {
  const params = useSearchParams();
  const fromUrl = params.get('outbreak');
  const stored = useUiStore((s) => s.outbreakId);
  const setOutbreak = useUiStore((s) => s.setOutbreak);
  useEffect(() => {
    if (fromUrl && fromUrl !== stored) setOutbreak(fromUrl);
  }, [fromUrl, stored, setOutbreak]);
  return fromUrl ?? stored;
}
