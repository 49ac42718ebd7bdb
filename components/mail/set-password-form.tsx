'use client';
import { useEffect, useState, type FormEvent } from 'react';
import { useSearchParams } from 'next/navigation';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { apiFetch, ApiError } from '@/lib/data/api';
import { ROLE_LABEL, type Role } from '@/lib/auth/roles';
import { invitationAcceptSchema, resetConfirmSchema } from '@/lib/validation/mail';
import { formatWhen } from '@/lib/mail/format';

interface Preview {
  email: string;
  name?: string;
  role?: Role;
  expiresAt: string;
}

/**
 * The page behind an invitation or reset link (`?token=`): checks the link first, then asks for
 * the password twice. One form for both, since both end in "choose a password".
 */
export function SetPasswordForm({ kind }: { kind: 'invite' | 'reset' }) {
  const token = useSearchParams().get('token') ?? '';
  const [preview, setPreview] = useState<Preview | null>(null);
  const [linkError, setLinkError] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    const url = kind === 'invite' ? `/api/auth/invitation?token=${encodeURIComponent(token)}` : `/api/auth/password-reset/confirm?token=${encodeURIComponent(token)}`;
    apiFetch<{ invitation?: Preview; reset?: Preview }>(url)
      .then((r) => setPreview(r.invitation ?? r.reset ?? null))
      .catch((err) => setLinkError(err instanceof ApiError ? (err.fields?.token ?? err.message) : 'Could not check the link.'));
  }, [kind, token]);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const password = String(form.get('password') ?? '');
    if (password !== String(form.get('repeat') ?? '')) {
      setFields({ repeat: 'The two passwords are not the same.' });
      return;
    }
    const input = kind === 'invite' ? { token, password, name: String(form.get('name') ?? '').trim() || undefined } : { token, password };
    const parsed = (kind === 'invite' ? invitationAcceptSchema : resetConfirmSchema).safeParse(input);
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setFields({});
    setBusy(true);
    setError(null);
    try {
      await apiFetch(kind === 'invite' ? '/api/auth/invitation' : '/api/auth/password-reset/confirm', { method: 'POST', json: parsed.data });
      setDone(kind === 'invite' ? 'Your account is active. Sign in with your e-mail address and the password you chose.' : 'Your password is changed. Sign in with the new password.');
    } catch (err) {
      if (err instanceof ApiError && err.fields) setFields(err.fields);
      setError(err instanceof Error ? err.message : 'Could not set the password.');
    } finally {
      setBusy(false);
    }
  }

  if (done) {
    return (
      <div className="flex flex-col gap-4" data-testid="password-set">
        <Notice tone="success">{done}</Notice>
        <a href="/signin" className="inline-flex min-h-14 items-center justify-center rounded-lg bg-accent px-6 text-lg font-bold text-white no-underline">Sign in</a>
      </div>
    );
  }
  if (linkError) {
    return (
      <div className="flex flex-col gap-4" data-testid="link-refused">
        <Notice tone="error">{linkError}</Notice>
        <a href={kind === 'invite' ? '/signin' : '/forgot'} className="font-bold text-accent">{kind === 'invite' ? 'Go to sign-in' : 'Ask for a new link'}</a>
      </div>
    );
  }
  if (!preview) return <p>Checking the link…</p>;
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4 rounded-xl border border-line bg-panel p-5" noValidate data-testid="set-password-form">
      {error && <Notice tone="error">{error}</Notice>}
      <p>
        {kind === 'invite' ? 'Account' : 'Password for'} <strong data-testid="link-email">{preview.email}</strong>
        {preview.role ? <> — {ROLE_LABEL[preview.role]}</> : null}. The link works until {formatWhen(new Date(preview.expiresAt))}.
      </p>
      {kind === 'invite' && <TextField label="Your name" name="name" defaultValue={preview.name} autoComplete="name" error={fields.name} />}
      <TextField label="New password" name="password" type="password" autoComplete="new-password" hint="At least 12 characters. A few unrelated words make a good one." error={fields.password} required />
      <TextField label="New password again" name="repeat" type="password" autoComplete="new-password" error={fields.repeat} required />
      <Button type="submit" size="lg" disabled={busy}>{busy ? 'Saving…' : kind === 'invite' ? 'Activate my account' : 'Set the new password'}</Button>
    </form>
  );
}
