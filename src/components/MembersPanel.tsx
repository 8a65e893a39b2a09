import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { formatDate } from '@/lib/api/format';
import { inviteRequestSchema, membersResponseSchema } from '@/lib/api/schemas';
import { roleLabels, roles } from '@/lib/auth/permissions';
import { getJson, sendJson } from './api-client';
import { QueryProvider } from './QueryProvider';
import { useHydrated } from './use-hydrated';

type InviteValues = z.input<typeof inviteRequestSchema>;

function InviteForm() {
  const hydrated = useHydrated();
  const client = useQueryClient();
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors },
  } = useForm<InviteValues>({
    resolver: zodResolver(inviteRequestSchema),
    defaultValues: { role: 'engineer' },
  });
  const invite = useMutation({
    mutationFn: (values: InviteValues) =>
      sendJson('POST', '/api/members/invitations', values, z.object({ id: z.string() })),
    onSuccess: () => {
      reset({ email: '', role: 'engineer' });
      void client.invalidateQueries({ queryKey: ['members'] });
    },
  });
  return (
    <form
      onSubmit={handleSubmit((v) => invite.mutate(v))}
      noValidate
      className="flex flex-wrap items-end gap-3 rounded-lg border border-mist bg-white p-4"
      aria-label="Invite a member"
    >
      <div className="min-w-64 flex-1">
        <label htmlFor="invite-email" className="block text-sm font-medium">
          E-mail
        </label>
        <input
          id="invite-email"
          type="email"
          className="mt-1 w-full rounded border border-slate-light px-3 py-2"
          aria-invalid={errors.email ? true : undefined}
          {...register('email')}
        />
        {errors.email && <p className="mt-1 text-sm text-fail">{errors.email.message}</p>}
      </div>
      <div>
        <label htmlFor="invite-role" className="block text-sm font-medium">
          Role
        </label>
        <select
          id="invite-role"
          className="mt-1 rounded border border-slate-light bg-white px-3 py-2"
          {...register('role')}
        >
          {roles.map((r) => (
            <option key={r} value={r}>
              {roleLabels[r]}
            </option>
          ))}
        </select>
      </div>
      <button
        type="submit"
        disabled={!hydrated || invite.isPending}
        className="rounded bg-buoy px-4 py-2 font-medium text-white hover:bg-buoy-dark disabled:opacity-60"
      >
        {invite.isPending ? 'Sending…' : 'Send invitation'}
      </button>
      <div className="basis-full text-sm" aria-live="polite">
        {invite.isError && (
          <p role="alert" className="text-fail">
            {invite.error.message}
          </p>
        )}
        {invite.isSuccess && <p className="text-pass">Invitation sent. It is valid for 7 days.</p>}
      </div>
    </form>
  );
}

function MembersBody() {
  const query = useQuery({
    queryKey: ['members'],
    queryFn: () => getJson('/api/members', membersResponseSchema),
  });
  return (
    <div className="space-y-8">
      <InviteForm />
      {query.isPending && <p className="text-slate">Loading members…</p>}
      {query.isError && (
        <p role="alert" className="text-fail">
          {query.error.message}
        </p>
      )}
      {query.data && (
        <>
          <section aria-labelledby="members-heading">
            <h2
              id="members-heading"
              className="text-sm font-semibold uppercase tracking-wide text-slate"
            >
              Members
            </h2>
            <table
              className="mt-2 w-full rounded-lg border border-mist bg-white text-left text-sm"
              data-testid="member-table"
            >
              <thead className="border-b border-mist bg-sand/60 text-xs uppercase tracking-wide text-slate">
                <tr>
                  <th className="px-4 py-2">Name</th>
                  <th className="px-4 py-2">E-mail</th>
                  <th className="px-4 py-2">Role</th>
                  <th className="px-4 py-2">Joined</th>
                </tr>
              </thead>
              <tbody>
                {query.data.members.map((m) => (
                  <tr key={m.id} className="border-b border-mist last:border-0">
                    <td className="px-4 py-2 font-medium">{m.name}</td>
                    <td className="px-4 py-2">{m.email}</td>
                    <td className="px-4 py-2">
                      {roleLabels[m.role as keyof typeof roleLabels] ?? m.role}
                    </td>
                    <td className="figures px-4 py-2">{formatDate(m.joinedAt)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
          <section aria-labelledby="invites-heading">
            <h2
              id="invites-heading"
              className="text-sm font-semibold uppercase tracking-wide text-slate"
            >
              Open invitations
            </h2>
            {query.data.invitations.length === 0 ? (
              <p className="mt-2 text-sm text-slate">
                No open invitations. Invite someone with the form above.
              </p>
            ) : (
              <ul
                className="mt-2 divide-y divide-mist rounded-lg border border-mist bg-white text-sm"
                data-testid="invitation-list"
              >
                {query.data.invitations.map((i) => (
                  <li key={i.id} className="flex justify-between px-4 py-2">
                    <span>
                      {i.email} · {roleLabels[i.role as keyof typeof roleLabels] ?? i.role}
                    </span>
                    <span className="figures text-slate">
                      {i.status === 'expired' ? 'expired' : `until ${formatDate(i.expiresAt)}`}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </section>
        </>
      )}
    </div>
  );
}

export default function MembersPanel() {
  return (
    <QueryProvider>
      <MembersBody />
    </QueryProvider>
  );
}
