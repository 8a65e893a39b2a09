import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import {
  displayIsrc,
  registrantInputSchema,
  registrantResponseSchema,
} from '@/lib/api/metadata-schemas';
import { getJson, sendJson } from '../api-client';
import { QueryProvider } from '../QueryProvider';
import { useHydrated } from '../use-hydrated';
import { buttonClass, describedBy, ErrorNote, Field, fieldIssues, inputClass } from './form-parts';

type Input = z.input<typeof registrantInputSchema>;
type Output = z.output<typeof registrantInputSchema>;
const queryKey = ['registrant'] as const;

function Settings() {
  const hydrated = useHydrated();
  const client = useQueryClient();
  const query = useQuery({
    queryKey,
    queryFn: () => getJson('/api/registrant', registrantResponseSchema),
  });
  const {
    register,
    handleSubmit,
    reset,
    setError,
    formState: { errors, isDirty },
  } = useForm<Input, unknown, Output>({
    resolver: zodResolver(registrantInputSchema),
    defaultValues: { prefix: '', rangeStart: 0, rangeEnd: 99_999 },
  });
  useEffect(() => {
    const r = query.data?.registrant;
    if (r)
      reset({
        prefix: `${r.prefix.slice(0, 2)}-${r.prefix.slice(2)}`,
        rangeStart: r.rangeStart,
        rangeEnd: r.rangeEnd,
      });
  }, [query.data, reset]);
  const save = useMutation({
    mutationFn: (values: Output) =>
      sendJson('PUT', '/api/registrant', values, registrantResponseSchema),
    onSuccess: (data) => client.setQueryData(queryKey, data),
    onError: (error) => {
      for (const issue of fieldIssues(error)) {
        const name = issue.path as keyof Input;
        if (name === 'prefix' || name === 'rangeStart' || name === 'rangeEnd')
          setError(name, { message: issue.message });
      }
    },
  });
  if (query.isPending) return <p className="text-slate">Loading…</p>;
  if (query.isError) return <ErrorNote error={query.error} />;
  const info = query.data;
  return (
    <div className="max-w-2xl space-y-4">
      <p className="text-sm text-ink-soft">
        The registrant prefix is the country (or agency) code and the registrant code your national
        ISRC agency gave the label, e.g. XQ-BRK. Quayside hands out the codes after it in order, for
        the current year of reference, and never hands out a code twice.
      </p>
      <div
        className="rounded-lg border border-mist bg-white p-4 text-sm"
        data-testid="registrant-status"
      >
        {info.registrant ? (
          <>
            Next code:{' '}
            <span className="figures font-medium">
              {displayIsrc(info.nextIsrc) || 'none left in the range'}
            </span>{' '}
            · <span className="figures">{info.issuedCount}</span> handed out by Quayside so far
          </>
        ) : (
          'No prefix yet: coordinators cannot allocate ISRCs until you set one.'
        )}
      </div>
      <form
        noValidate
        aria-label="ISRC registrant"
        onSubmit={handleSubmit((v) => save.mutate(v))}
        className="grid gap-4 rounded-lg border border-mist bg-white p-4 sm:grid-cols-3"
      >
        <Field
          id="registrant-prefix"
          label="Registrant prefix"
          error={errors.prefix?.message}
          hint="Two letters and three letters or digits"
        >
          <input
            {...register('prefix')}
            {...describedBy('registrant-prefix', errors.prefix?.message)}
            className={`${inputClass} figures`}
          />
        </Field>
        <Field
          id="registrant-start"
          label="First designation code"
          error={errors.rangeStart?.message}
        >
          <input
            type="number"
            {...register('rangeStart', { valueAsNumber: true })}
            {...describedBy('registrant-start', errors.rangeStart?.message)}
            className={`${inputClass} figures`}
          />
        </Field>
        <Field id="registrant-end" label="Last designation code" error={errors.rangeEnd?.message}>
          <input
            type="number"
            {...register('rangeEnd', { valueAsNumber: true })}
            {...describedBy('registrant-end', errors.rangeEnd?.message)}
            className={`${inputClass} figures`}
          />
        </Field>
        <div className="sm:col-span-3 flex items-center gap-3">
          <button type="submit" className={buttonClass} disabled={!hydrated || save.isPending}>
            Save prefix
          </button>
          <span aria-live="polite" className="text-sm text-pass">
            {save.isSuccess && !isDirty ? 'Saved.' : ''}
          </span>
        </div>
        {save.isError && fieldIssues(save.error).length === 0 && (
          <div className="sm:col-span-3">
            <ErrorNote error={save.error} />
          </div>
        )}
      </form>
    </div>
  );
}

/** The admin's settings page for the label's ISRC registrant prefix and range. */
export default function RegistrantSettings() {
  return (
    <QueryProvider>
      <Settings />
    </QueryProvider>
  );
}
