'use client';
import { useState, type FormEvent } from 'react';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { ROLES, ROLE_LABEL, type Role } from '@/lib/auth/roles';
import { userCreateSchema } from '@/lib/validation/user';
import { apiFetch, ApiError } from '@/lib/data/api';
import type { UserRecord } from '@/lib/types/records';

interface TeamOption { id: string; name: string; outbreakId: string; outbreakName: string }
export interface UsersAdminProps { users: UserRecord[]; teams: TeamOption[] }

/** The admin's users table: create a user, change role and teams, deactivate. */
export function UsersAdmin({ users: initial, teams }: UsersAdminProps) {
  const [users, setUsers] = useState(initial);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const teamName = (id: string) => teams.find((t) => t.id === id)?.name ?? '?';

  async function create(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const data = new FormData(form);
    const role = data.get('role') as Role;
    const teamIds = data.getAll('teamIds').map(String);
    const outbreakIds = role === 'field' ? [] : [...new Set(teams.filter((t) => teamIds.includes(t.id)).map((t) => t.outbreakId))];
    const input = { email: data.get('email'), name: data.get('name'), role, password: data.get('password') || undefined,
      teamIds: role === 'field' ? teamIds : [], outbreakIds };
    const parsed = userCreateSchema.safeParse(input);
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message])));
      return;
    }
    try {
      const { user } = await apiFetch<{ user: UserRecord }>('/api/users', { method: 'POST', json: parsed.data });
      setUsers((u) => [...u, user]);
      setFields({});
      setMessage({ tone: 'success', text: `${user.email} created.` });
      form.reset();
    } catch (err) {
      if (err instanceof ApiError && err.fields) setFields(err.fields);
      setMessage({ tone: 'error', text: err instanceof Error ? err.message : 'Could not create the user.' });
    }
  }

  async function patch(id: string, body: Record<string, unknown>) {
    try {
      const { user } = await apiFetch<{ user: UserRecord }>(`/api/users/${id}`, { method: 'PATCH', json: body });
      setUsers((list) => list.map((u) => (u.id === id ? user : u)));
      setMessage({ tone: 'success', text: `${user.email} updated.` });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof Error ? err.message : 'Could not update the user.' });
    }
  }

  return (
    <div className="flex flex-col gap-4">
      <h1>Users</h1>
      {message && <Notice tone={message.tone}>{message.text}</Notice>}
      <div className="overflow-x-auto rounded-xl border border-line bg-panel">
        <table className="w-full text-left" data-testid="users-table">
          <thead className="border-b border-line">
            <tr>
              <th className="p-2">Name</th><th className="p-2">E-mail</th><th className="p-2">Role</th><th className="p-2">Teams</th><th className="p-2">State</th>
            </tr>
          </thead>
          <tbody>
            {users.map((u) => (
              <tr key={u.id} className="border-b border-line/60">
                <td className="p-2 font-bold">{u.name}</td>
                <td className="p-2">{u.email}</td>
                <td className="p-2">
                  <select aria-label={`Role of ${u.email}`} className="min-h-touch rounded border border-ink/30 bg-white px-2" value={u.role}
                    onChange={(e) => patch(u.id, { role: e.target.value })}>
                    {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABEL[r]}</option>)}
                  </select>
                </td>
                <td className="p-2">{u.teamIds.map(teamName).join(', ') || '—'}</td>
                <td className="p-2">
                  <Button variant={u.active ? 'secondary' : 'primary'} onClick={() => patch(u.id, { active: !u.active })}
                    aria-label={`${u.active ? 'Deactivate' : 'Reactivate'} ${u.email}`}>
                    {u.active ? 'Deactivate' : 'Reactivate'}
                  </Button>
                  {!u.active && <span className="ml-2 font-bold text-warning">inactive</span>}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <Card title="New user">
        <form onSubmit={create} className="grid gap-3 sm:grid-cols-2" noValidate>
          <TextField label="Name" name="name" error={fields.name} required />
          <TextField label="E-mail" name="email" type="email" error={fields.email} required />
          <SelectField label="Role" name="role" options={ROLES.map((r) => ({ value: r, label: ROLE_LABEL[r] }))} error={fields.role} />
          <TextField label="Password" name="password" type="password" hint="At least 12 characters; or leave empty and send an invitation." error={fields.password} />
          <fieldset className="sm:col-span-2">
            <legend className="font-bold">Teams (field officers) / outbreaks (through a team, for coordinators and supervisors)</legend>
            <div className="flex flex-wrap gap-3">
              {teams.map((t) => (
                <label key={t.id} className="flex min-h-touch items-center gap-2">
                  <input type="checkbox" name="teamIds" value={t.id} className="h-5 w-5" /> {t.name} <span className="text-ink/70">({t.outbreakName})</span>
                </label>
              ))}
            </div>
          </fieldset>
          <div className="sm:col-span-2"><Button type="submit">Create user</Button></div>
        </form>
      </Card>
    </div>
  );
}
