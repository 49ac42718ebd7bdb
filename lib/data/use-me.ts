'use client';
import { useEffect, useState } from 'react';
import type { Actor } from '@/lib/auth/actor';
import { apiFetch, ApiError } from './api';

const KEY = 'ebbcast.me';

export interface MeState {
  me: Actor | null;
  /** True until the first answer (or the cached identity) is known. */
  loading: boolean;
  /** True when the identity shown comes from this device's cache because the server is unreachable. */
  fromCache: boolean;
}

function cached(): Actor | null {
  try {
    const raw = localStorage.getItem(KEY);
    return raw ? (JSON.parse(raw) as Actor) : null;
  } catch {
    return null;
  }
}

/**
 * Who is signed in. Offline, the last identity seen on this device is used, so a field officer
 * keeps working on local data when the network (or a 12 h session) is gone; sign-in is asked
 * for only when the server answers that the session is over.
 */
export function useMe(): MeState {
  const [state, setState] = useState<MeState>({ me: null, loading: true, fromCache: false });
  useEffect(() => {
    let live = true;
    const local = cached();
    if (local) setState({ me: local, loading: false, fromCache: true });
    apiFetch<{ user: Actor }>('/api/me')
      .then(({ user }) => {
        localStorage.setItem(KEY, JSON.stringify(user));
        if (live) setState({ me: user, loading: false, fromCache: false });
      })
      .catch((err: unknown) => {
        if (!live) return;
        if (err instanceof ApiError && err.status === 401) {
          // Signed out on the server: keep the cached identity for local work, but say so.
          setState({ me: local, loading: false, fromCache: Boolean(local) });
        } else {
          setState({ me: local, loading: false, fromCache: Boolean(local) });
        }
      });
    return () => {
      live = false;
    };
  }, []);
  return state;
}

export function forgetMe(): void {
  localStorage.removeItem(KEY);
}
