import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { acceptInvitationRequestSchema } from '@/lib/api/schemas';
import { roleLabels } from '@/lib/auth/permissions';
import { ApiRequestError, sendJson } from './api-client';
import { useHydrated } from './use-hydrated';

const formSchema = acceptInvitationRequestSchema
  .extend({ confirm: z.string() })
  .refine((v) => v.password === v.confirm, {
    path: ['confirm'],
    message: 'The two passwords differ',
  });
type FormValues = z.infer<typeof formSchema>;

interface Props {
  invitationId: string;
  email: string;
  role: string | null;
  organizationName: string;
}

export default function AcceptInvitation({ invitationId, email, role, organizationName }: Props) {
  const hydrated = useHydrated();
  const [failure, setFailure] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<FormValues>({ resolver: zodResolver(formSchema) });

  async function onSubmit({ name, password }: FormValues) {
    setFailure(null);
    try {
      await sendJson(
        'POST',
        `/api/invitations/${encodeURIComponent(invitationId)}/accept`,
        { name, password },
        z.object({ ok: z.literal(true) }),
      );
      window.location.assign('/releases');
    } catch (error) {
      setFailure(
        error instanceof ApiRequestError
          ? error.message
          : 'Quayside could not be reached. Try again.',
      );
    }
  }
  const field = 'mt-1 block w-full rounded border border-slate-light bg-white px-3 py-2';
  const roleName = role ? (roleLabels[role as keyof typeof roleLabels] ?? role) : 'member';
  return (
    <form
      onSubmit={handleSubmit(onSubmit)}
      noValidate
      className="space-y-4"
      aria-label="Accept invitation"
    >
      <p>
        You are invited to <strong>{organizationName}</strong> as <strong>{roleName}</strong>. Your
        sign-in will be <span className="figures">{email}</span>.
      </p>
      <div>
        <label htmlFor="name" className="block text-sm font-medium">
          Your name
        </label>
        <input id="name" autoComplete="name" className={field} {...register('name')} />
        {errors.name && <p className="mt-1 text-sm text-fail">{errors.name.message}</p>}
      </div>
      <div>
        <label htmlFor="password" className="block text-sm font-medium">
          Choose a password
        </label>
        <input
          id="password"
          type="password"
          autoComplete="new-password"
          className={field}
          {...register('password')}
        />
        {errors.password && <p className="mt-1 text-sm text-fail">{errors.password.message}</p>}
      </div>
      <div>
        <label htmlFor="confirm" className="block text-sm font-medium">
          Repeat the password
        </label>
        <input
          id="confirm"
          type="password"
          autoComplete="new-password"
          className={field}
          {...register('confirm')}
        />
        {errors.confirm && <p className="mt-1 text-sm text-fail">{errors.confirm.message}</p>}
      </div>
      <div aria-live="polite">
        {failure && (
          <p role="alert" className="text-sm text-fail">
            {failure}
          </p>
        )}
      </div>
      <button
        type="submit"
        disabled={!hydrated || isSubmitting}
        className="w-full rounded bg-buoy px-4 py-2 font-medium text-white hover:bg-buoy-dark disabled:opacity-60"
      >
        {isSubmitting ? 'Joining…' : 'Join and sign in'}
      </button>
    </form>
  );
}
