'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { inviteSchema } from '@/lib/accounts/schemas';
import type { TeamMember } from '@/lib/accounts/team';
import { Field, FormBanner, applyServerIssues, postJson } from '../form-kit';

interface OpenInvitation {
  id: number;
  email: string;
  role: 'owner' | 'member';
  expiresAt: string;
  expired: boolean;
}

type InviteValues = z.input<typeof inviteSchema>;

/** Members and invitations; owners get the controls. The routes refuse anyone else. */
export function TeamManager(props: { isOwner: boolean; selfUserId: number; members: TeamMember[]; invitations: OpenInvitation[]; seats: { plan: string; limit: number; taken: number } }) {
  const router = useRouter();
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const [busy, setBusy] = useState<string | null>(null);

  async function act(key: string, url: string, method: string, body?: unknown, done?: string) {
    setBusy(key);
    setMessage(null);
    const result = await postJson(url, body ?? {}, method);
    setBusy(null);
    if (result.ok) {
      if (done) setMessage({ tone: 'success', text: done });
      router.refresh();
    } else setMessage({ tone: 'error', text: result.message });
  }

  return (
    <div className="space-y-6">
      {message ? <FormBanner tone={message.tone}>{message.text}</FormBanner> : null}
      <section className="pw-card overflow-hidden">
        <h2 className="px-6 pt-5 text-xl font-bold">Members</h2>
        <table className="mt-3 w-full text-left text-sm">
          <thead className="border-b border-ink/10 text-ink-faint">
            <tr>
              <th className="px-6 py-2 font-bold">Name</th>
              <th className="px-3 py-2 font-bold">E-mail</th>
              <th className="px-3 py-2 font-bold">Role</th>
              {props.isOwner ? <th className="px-6 py-2 text-right font-bold">Actions</th> : null}
            </tr>
          </thead>
          <tbody>
            {props.members.map((m) => (
              <tr key={m.membershipId} className="border-b border-ink/5 last:border-0">
                <td className="px-6 py-3 font-bold">
                  {m.name}
                  {m.userId === props.selfUserId ? <span className="ml-2 text-xs font-normal text-ink-faint">(you)</span> : null}
                </td>
                <td className="px-3 py-3 text-ink-soft">{m.email}</td>
                <td className="px-3 py-3">
                  {props.isOwner ? (
                    <>
                      <label className="sr-only" htmlFor={`role-${m.membershipId}`}>
                        Role of {m.name}
                      </label>
                      <select
                        id={`role-${m.membershipId}`}
                        className="rounded-lg border border-ink/15 bg-white px-2 py-1"
                        value={m.role}
                        disabled={busy !== null}
                        onChange={(e) => act(`role-${m.membershipId}`, `/api/team/members/${m.membershipId}`, 'PATCH', { role: e.target.value }, `${m.name} is now ${e.target.value === 'owner' ? 'an owner' : 'a member'}.`)}
                      >
                        <option value="owner">Owner</option>
                        <option value="member">Member</option>
                      </select>
                    </>
                  ) : (
                    <span className={`rounded-full px-2 py-0.5 text-xs font-bold ${m.role === 'owner' ? 'bg-moss-100 text-moss-900' : 'bg-paper-deep text-ink-soft'}`}>{m.role === 'owner' ? 'Owner' : 'Member'}</span>
                  )}
                </td>
                {props.isOwner ? (
                  <td className="px-6 py-3 text-right">
                    <button
                      type="button"
                      className="text-sm font-bold text-clay-700 hover:underline disabled:opacity-50"
                      disabled={busy !== null}
                      onClick={() => {
                        if (window.confirm(`Remove ${m.name} (${m.email}) from this workspace?`)) void act(`remove-${m.membershipId}`, `/api/team/members/${m.membershipId}`, 'DELETE', undefined, `${m.name} was removed.`);
                      }}
                    >
                      Remove
                    </button>
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section className="pw-card p-6">
        <h2 className="text-xl font-bold">Pending invitations</h2>
        {props.invitations.length === 0 ? (
          <p className="mt-2 text-sm text-ink-soft">None open.</p>
        ) : (
          <ul className="mt-3 divide-y divide-ink/5">
            {props.invitations.map((i) => (
              <li key={i.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
                <span>
                  <strong>{i.email}</strong> as {i.role} · {i.expired ? <span className="text-clay-700">expired {i.expiresAt.slice(0, 10)}</span> : <>valid until {i.expiresAt.slice(0, 10)}</>}
                </span>
                {props.isOwner ? (
                  <button type="button" className="font-bold text-clay-700 hover:underline" disabled={busy !== null} onClick={() => act(`revoke-${i.id}`, `/api/team/invitations/${i.id}`, 'DELETE', undefined, `The invitation to ${i.email} was withdrawn.`)}>
                    Withdraw
                  </button>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {props.isOwner ? <InviteForm onDone={(text) => { setMessage({ tone: 'success', text }); router.refresh(); }} seats={props.seats} /> : <p className="mt-4 text-sm text-ink-faint">Only owners invite people and change roles.</p>}
      </section>
    </div>
  );
}

function InviteForm({ onDone, seats }: { onDone: (text: string) => void; seats: { plan: string; limit: number; taken: number } }) {
  const [banner, setBanner] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm<InviteValues>({ resolver: zodResolver(inviteSchema), defaultValues: { email: '', role: 'member' } });
  const onSubmit = handleSubmit(async (values) => {
    setBanner(null);
    const result = await postJson<{ invitation: { email: string } }>('/api/team/invitations', values);
    if (result.ok) {
      reset({ email: '', role: 'member' });
      onDone(`Invitation sent to ${result.data.invitation.email}. The link works for 7 days.`);
      return;
    }
    const rest = applyServerIssues(setError, result.issues, ['email', 'role']);
    if (rest.length || !result.issues.length) setBanner(rest.join(' ') || result.message);
  });
  return (
    <form onSubmit={onSubmit} noValidate className="mt-6 border-t border-ink/10 pt-5" aria-label="Invite someone">
      <h3 className="font-sans text-base font-bold">Invite someone</h3>
      {seats.taken >= seats.limit ? <p className="mt-1 text-sm text-saffron-700">{seats.limit === 1 ? `The one seat of the ${seats.plan} plan is in use.` : `All ${seats.limit} seats of the ${seats.plan} plan are in use.`}</p> : null}
      {banner ? <div className="mt-3"><FormBanner>{banner}</FormBanner></div> : null}
      <div className="mt-3 grid gap-3 sm:grid-cols-[1fr_10rem_auto] sm:items-start">
        <Field label="E-mail" type="email" placeholder="colleague@example.org" error={formState.errors.email?.message} {...register('email')} />
        <div>
          <label htmlFor="invite-role" className="pw-label">
            Role
          </label>
          <select id="invite-role" className="pw-input" {...register('role')}>
            <option value="member">Member</option>
            <option value="owner">Owner</option>
          </select>
          {formState.errors.role ? <p className="pw-field-error">{formState.errors.role.message}</p> : null}
        </div>
        <button type="submit" className="pw-button sm:mt-6" disabled={formState.isSubmitting}>
          {formState.isSubmitting ? 'Sending…' : 'Send invitation'}
        </button>
      </div>
    </form>
  );
}
