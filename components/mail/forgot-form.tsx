'use client';
import { useState, type FormEvent } from 'react';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { apiFetch, ApiError } from '@/lib/data/api';
import { resetRequestSchema } from '@/lib/validation/mail';

/** "Forgot password": asks for a reset link. The answer is the same for every address. */
export function ForgotForm() {
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const parsed = resetRequestSchema.safeParse({ email: new FormData(e.currentTarget).get('email') });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? 'Not an e-mail address.');
      return;
    }
    setBusy(true);
    setError(null);
    try {
      const res = await apiFetch<{ message: string }>('/api/auth/password-reset', { method: 'POST', json: parsed.data });
      setDone(res.message);
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'Could not send the request.');
    } finally {
      setBusy(false);
    }
  }

  if (done) {
    return (
      <div className="flex flex-col gap-4" data-testid="forgot-done">
        <Notice tone="success">{done}</Notice>
        <p>Check your inbox (and the spam folder). The message comes from Ebbcast and holds a link to choose a new password.</p>
        <a href="/signin" className="font-bold text-accent">Back to sign-in</a>
      </div>
    );
  }
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4 rounded-xl border border-line bg-panel p-5" noValidate>
      <TextField label="E-mail" name="email" type="email" autoComplete="username" required error={error ?? undefined} />
      <Button type="submit" size="lg" disabled={busy}>{busy ? 'Sending…' : 'Send me a reset link'}</Button>
      <a href="/signin" className="text-accent">Back to sign-in</a>
    </form>
  );
}
