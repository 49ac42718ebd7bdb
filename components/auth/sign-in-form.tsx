'use client';
import { useState, type FormEvent } from 'react';
import { useSearchParams } from 'next/navigation';
import { signIn } from 'next-auth/react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { signInSchema } from '@/lib/validation/user';
import { apiFetch } from '@/lib/data/api';
import { HOME } from '@/lib/auth/navigation';
import type { Actor } from '@/lib/auth/actor';

export function SignInForm() {
  const params = useSearchParams();
  const [error, setError] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const parsed = signInSchema.safeParse({ email: form.get('email'), password: form.get('password') });
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setFields({});
    setBusy(true);
    setError(null);
    const res = await signIn('credentials', { ...parsed.data, redirect: false });
    if (!res || res.error) {
      setBusy(false);
      setError(
        !res ? 'No connection to the server. Signing in needs a network once.'
        : res.error === 'CredentialsSignin' ? 'That e-mail address and password do not match an active account.'
        : res.error,
      );
      return;
    }
    const { user } = await apiFetch<{ user: Actor }>('/api/me');
    localStorage.setItem('ebbcast.me', JSON.stringify(user));
    const next = params.get('callbackUrl');
    const safe = next && next.startsWith('/') && !next.startsWith('//') ? next : HOME[user.role];
    window.location.assign(safe);
  }

  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4 rounded-xl border border-line bg-panel p-5" noValidate>
      {error && <div data-testid="sign-in-error"><Notice tone="error">{error}</Notice></div>}
      <TextField label="E-mail" name="email" type="email" autoComplete="username" required error={fields.email} />
      <TextField label="Password" name="password" type="password" autoComplete="current-password" required error={fields.password} />
      <Button type="submit" size="lg" disabled={busy}>{busy ? 'Signing in…' : 'Sign in'}</Button>
      <a href="/forgot" className="inline-flex min-h-touch items-center self-start text-accent">Forgot password?</a>
    </form>
  );
}
