'use client';
import { useState, type FormEvent } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { ROLE_LABEL, type Role } from '@/lib/auth/roles';
import { invitationInputSchema } from '@/lib/validation/mail';
import { apiFetch, ApiError } from '@/lib/data/api';
import { formatWhen } from '@/lib/mail/format';

export interface InviteTeamOption { id: string; name: string; outbreakId: string; outbreakName: string }
interface Pending { userId: string; email: string; name: string; role: Role; expiresAt: string; expired: boolean }

export interface InviteFormProps {
  teams: InviteTeamOption[];
  outbreaks: { id: string; name: string }[];
  roles: Role[];
  pending: Pending[];
}

/**
 * Invite a person by e-mail: their name, address, role, and teams (field officers) or outbreaks
 * (coordinators, supervisors). Closed until asked for, so the page stays about its main table.
 */
export function InviteForm({ teams, outbreaks, roles, pending: initialPending }: InviteFormProps) {
  const [open, setOpen] = useState(false);
  const [role, setRole] = useState<Role>('field');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const [pending, setPending] = useState(initialPending);
  const [busy, setBusy] = useState(false);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const data = new FormData(form);
    const input = {
      email: data.get('email'), name: data.get('name'), role,
      teamIds: role === 'field' ? data.getAll('teamIds').map(String) : [],
      outbreakIds: role === 'coordinator' || role === 'supervisor' ? data.getAll('outbreakIds').map(String) : [],
    };
    const parsed = invitationInputSchema.safeParse(input);
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message])));
      return;
    }
    setFields({});
    setBusy(true);
    try {
      const { invitation } = await apiFetch<{ invitation: Pending & { resent: boolean } }>('/api/invitations', { method: 'POST', json: parsed.data });
      setMessage({ tone: 'success', text: `Invitation ${invitation.resent ? 'sent again' : 'sent'} to ${invitation.email}. The link works until ${formatWhen(new Date(invitation.expiresAt))}.` });
      setPending((list) => [{ ...invitation, expired: false }, ...list.filter((p) => p.email !== invitation.email)]);
      form.reset();
      setRole('field');
    } catch (err) {
      if (err instanceof ApiError && err.fields) setFields(err.fields);
      setMessage({ tone: 'error', text: err instanceof Error ? err.message : 'Could not send the invitation.' });
    } finally {
      setBusy(false);
    }
  }

  return (
    <Card className="mt-4" title="Invitations" actions={!open && <Button variant="secondary" onClick={() => setOpen(true)}>Invite by e-mail</Button>}>
      {message && <div className="mb-3" data-testid="invite-message"><Notice tone={message.tone}>{message.text}</Notice></div>}
      {open && (
        <form onSubmit={submit} className="grid gap-3 sm:grid-cols-2" noValidate data-testid="invite-form">
          <TextField label="Their name" name="name" autoComplete="off" error={fields.name} required />
          <TextField label="Their e-mail address" name="email" type="email" autoComplete="off" error={fields.email} required />
          <SelectField label="Role" name="role" value={role} onChange={(e) => setRole(e.target.value as Role)}
            options={roles.map((r) => ({ value: r, label: ROLE_LABEL[r] }))} error={fields.role} />
          {role === 'field' && (
            <fieldset className="sm:col-span-2">
              <legend className="font-bold">Teams</legend>
              {fields.teamIds && <p role="alert" className="text-sm font-bold text-warning">{fields.teamIds}</p>}
              <div className="flex flex-wrap gap-3">
                {teams.map((t) => (
                  <label key={t.id} className="flex min-h-touch items-center gap-2">
                    <input type="checkbox" name="teamIds" value={t.id} className="h-5 w-5" /> {t.name} <span className="text-ink/70">({t.outbreakName})</span>
                  </label>
                ))}
              </div>
            </fieldset>
          )}
          {(role === 'coordinator' || role === 'supervisor') && (
            <fieldset className="sm:col-span-2">
              <legend className="font-bold">Outbreaks</legend>
              {fields.outbreakIds && <p role="alert" className="text-sm font-bold text-warning">{fields.outbreakIds}</p>}
              <div className="flex flex-wrap gap-3">
                {outbreaks.map((o) => (
                  <label key={o.id} className="flex min-h-touch items-center gap-2">
                    <input type="checkbox" name="outbreakIds" value={o.id} className="h-5 w-5" /> {o.name}
                  </label>
                ))}
              </div>
            </fieldset>
          )}
          <p className="text-sm text-ink/70 sm:col-span-2">
            They receive a link that works once, for 72 hours, to choose their own password. Nobody else learns it.
          </p>
          <div className="flex gap-2 sm:col-span-2">
            <Button type="submit" disabled={busy}>{busy ? 'Sending…' : 'Send invitation'}</Button>
            <Button variant="quiet" onClick={() => setOpen(false)}>Close</Button>
          </div>
        </form>
      )}
      {pending.length > 0 && (
        <div className="mt-3">
          <h3 className="font-bold">Waiting for an answer</h3>
          <ul className="mt-1 flex flex-col gap-1" data-testid="pending-invitations">
            {pending.map((p) => (
              <li key={p.userId}>
                {p.name} &lt;{p.email}&gt; — {ROLE_LABEL[p.role]},{' '}
                {p.expired ? <span className="font-bold text-warning">link expired: send again</span> : <>link works until {formatWhen(new Date(p.expiresAt))}</>}
              </li>
            ))}
          </ul>
        </div>
      )}
    </Card>
  );
}
