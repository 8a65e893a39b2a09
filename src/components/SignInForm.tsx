import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { useHydrated } from './use-hydrated';

const signInSchema = z.object({
  email: z.email('Enter the e-mail address you were invited with'),
  password: z.string().min(1, 'Enter your password'),
});
type SignInValues = z.infer<typeof signInSchema>;

/** Only same-site paths are followed after sign-in. */
function safeNext(next: string | null): string {
  return next?.startsWith('/') && !next.startsWith('//') ? next : '/releases';
}

export default function SignInForm({ next }: { next: string | null }) {
  const hydrated = useHydrated();
  const [failure, setFailure] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<SignInValues>({ resolver: zodResolver(signInSchema) });

  async function onSubmit(values: SignInValues) {
    setFailure(null);
    const response = await fetch('/api/auth/sign-in/email', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(values),
    }).catch(() => null);
    if (!response) {
      setFailure('Quayside could not be reached. Check your connection and try again.');
      return;
    }
    if (!response.ok) {
      if (response.status === 429) {
        // The server says which limit was hit and for how long (better-auth's { message }).
        const body = (await response.json().catch(() => null)) as { message?: unknown } | null;
        const seconds = Number(response.headers.get('Retry-After'));
        setFailure(
          typeof body?.message === 'string' && body.message
            ? body.message
            : `Too many sign-in attempts. Try again in ${Math.max(1, Math.ceil(seconds / 60) || 1)} minute(s).`,
        );
        return;
      }
      setFailure(
        response.status === 401
          ? 'That e-mail and password do not match an account.'
          : `Sign-in failed (${response.status}). Try again in a moment.`,
      );
      return;
    }
    window.location.assign(safeNext(next));
  }

  const field = 'mt-1 block w-full rounded border border-slate-light bg-white px-3 py-2 text-ink';
  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate className="space-y-5" aria-label="Sign in">
      <div>
        <label htmlFor="email" className="block text-sm font-medium">
          E-mail
        </label>
        <input
          id="email"
          type="email"
          autoComplete="username"
          className={field}
          aria-invalid={errors.email ? true : undefined}
          aria-describedby={errors.email ? 'email-error' : undefined}
          {...register('email')}
        />
        {errors.email && (
          <p id="email-error" className="mt-1 text-sm text-fail">
            {errors.email.message}
          </p>
        )}
      </div>
      <div>
        <label htmlFor="password" className="block text-sm font-medium">
          Password
        </label>
        <input
          id="password"
          type="password"
          autoComplete="current-password"
          className={field}
          aria-invalid={errors.password ? true : undefined}
          aria-describedby={errors.password ? 'password-error' : undefined}
          {...register('password')}
        />
        {errors.password && (
          <p id="password-error" className="mt-1 text-sm text-fail">
            {errors.password.message}
          </p>
        )}
      </div>
      <div aria-live="polite">
        {failure && (
          <p
            role="alert"
            className="rounded border border-fail/40 bg-fail/5 px-3 py-2 text-sm text-fail"
          >
            {failure}
          </p>
        )}
      </div>
      <button
        type="submit"
        disabled={!hydrated || isSubmitting}
        className="w-full rounded bg-buoy px-4 py-2 font-medium text-white hover:bg-buoy-dark disabled:opacity-60"
      >
        {isSubmitting ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
