import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useEffect, useRef, useState } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import {
  creditRoleLabels,
  displayIsrc,
  type TrackFields,
  type TrackFieldsInput,
  trackFieldsSchema,
} from '@/lib/api/metadata-schemas';
import { type ReleaseDetail, releaseDetailSchema, type Track } from '@/lib/api/schemas';
import { CREDIT_ROLES } from '@/lib/specs/types';
import { getJson } from '../api-client';
import { releaseQueryKey } from '../release/workspace-types';
import { useHydrated } from '../use-hydrated';
import {
  buttonClass,
  describedBy,
  ErrorNote,
  Field,
  fieldIssues,
  inputClass,
  isConflict,
  quietButtonClass,
} from './form-parts';
import { useIsrcAllocation, useTrackPatch } from './track-api';

function toFormValues(t: Track): TrackFieldsInput {
  return {
    title: t.title,
    versionTitle: t.versionTitle ?? '',
    artist: t.artist,
    isrc: displayIsrc(t.isrc),
    iswc: t.iswc ?? '',
    explicit: t.explicit,
    credits: t.credits.map((c) => ({
      name: c.name,
      role: c.role as (typeof CREDIT_ROLES)[number],
      isni: c.isni ?? '',
    })),
    disc: t.disc,
    side: t.side ?? '',
  };
}

const labels: Record<Exclude<keyof TrackFieldsInput, 'credits'>, string> = {
  title: 'Title',
  versionTitle: 'Version',
  artist: 'Artists',
  isrc: 'ISRC',
  iswc: 'ISWC',
  explicit: 'Explicit',
  disc: 'Disc',
  side: 'Side',
};

/** The full track form: a panel under the table, with credits and identifiers. */
export function TrackEditor({
  release,
  track,
  onClose,
}: {
  release: ReleaseDetail;
  track: Track;
  onClose: () => void;
}) {
  const hydrated = useHydrated();
  const client = useQueryClient();
  const [basis, setBasis] = useState(track);
  const [theirChanges, setTheirChanges] = useState<string | null>(null);
  const heading = useRef<HTMLHeadingElement>(null);
  const patch = useTrackPatch(release.id);
  const allocate = useIsrcAllocation(release.id);
  const {
    register,
    control,
    handleSubmit,
    setError,
    setValue,
    resetField,
    formState: { errors, dirtyFields },
  } = useForm<TrackFieldsInput, unknown, TrackFields>({
    resolver: zodResolver(trackFieldsSchema),
    defaultValues: toFormValues(track),
  });
  const credits = useFieldArray({ control, name: 'credits' });

  useEffect(() => heading.current?.focus(), []);

  // An allocation changes the recording (ISRC and version): adopt both, keep other typed values.
  useEffect(() => {
    if (track.recordingVersion !== basis.recordingVersion && track.isrc && !basis.isrc) {
      setValue('isrc', displayIsrc(track.isrc));
      setBasis((b) => ({ ...b, isrc: track.isrc, recordingVersion: track.recordingVersion }));
    }
  }, [track, basis, setValue]);

  const reload = useMutation({
    mutationFn: () =>
      getJson(`/api/releases/${encodeURIComponent(release.id)}`, releaseDetailSchema),
    onSuccess: (latest) => {
      client.setQueryData(releaseQueryKey(latest.id), latest);
      const fresh = latest.tracks.find((t) => t.id === track.id);
      if (!fresh) return;
      const before = toFormValues(basis);
      const after = toFormValues(fresh);
      const changed = (Object.keys(labels) as (keyof typeof labels)[])
        .filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k]))
        .map((k) => `${labels[k]}: ${String(after[k] || '–')}`);
      if (JSON.stringify(before.credits) !== JSON.stringify(after.credits)) changed.push('credits');
      // Fields the user has not touched take the saved values; typed ones stay as typed.
      for (const name of Object.keys(after) as (keyof TrackFieldsInput)[]) {
        if (!dirtyFields[name]) resetField(name, { defaultValue: after[name] });
      }
      setTheirChanges(changed.join('; ') || 'nothing in this form');
      setBasis(fresh);
      patch.reset();
    },
  });

  const onSubmit = (values: TrackFields) =>
    patch.mutate(
      { trackId: track.id, recordingVersion: basis.recordingVersion, fields: values },
      {
        onSuccess: () => onClose(),
        onError: (error) => {
          for (const issue of fieldIssues(error)) {
            const [name, index, sub] = issue.path.split('.');
            if (name === 'credits' && index !== undefined && sub) {
              setError(`credits.${Number(index)}.${sub as 'name' | 'role' | 'isni'}`, {
                message: issue.message,
              });
            } else if (name && name in labels) {
              setError(name as keyof typeof labels, { message: issue.message });
            }
          }
        },
      },
    );

  const text = (name: keyof typeof labels, opts: { hint?: string; mono?: boolean } = {}) => {
    const id = `track-${name}`;
    const error = errors[name]?.message;
    return (
      <Field id={id} label={labels[name]} error={error} hint={opts.hint}>
        <input
          {...register(name, name === 'disc' ? { valueAsNumber: true } : {})}
          {...describedBy(id, error, opts.hint)}
          className={`${inputClass}${opts.mono ? ' figures' : ''}`}
          autoComplete="off"
        />
      </Field>
    );
  };

  return (
    <form
      aria-labelledby="track-editor-heading"
      noValidate
      onSubmit={handleSubmit(onSubmit)}
      onKeyDown={(e) => {
        if (e.key === 'Escape') onClose();
      }}
      className="mt-4 rounded-lg border border-slate-light bg-paper p-4"
      data-testid="track-editor"
    >
      <h3 id="track-editor-heading" ref={heading} tabIndex={-1} className="text-lg font-semibold">
        Track {track.position}: {track.title}
      </h3>
      <div className="mt-3 grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {text('title')}
        {text('versionTitle', { hint: 'e.g. Extended Mix, Radio Edit; empty for the original' })}
        {text('artist', { hint: 'Primary artists as credited; featured artists go in credits' })}
        <div>
          {text('isrc', { mono: true, hint: 'CC-XXX-YY-NNNNN; one per recording' })}
          {!basis.isrc && (
            <button
              type="button"
              className={`${quietButtonClass} mt-2`}
              disabled={!hydrated || allocate.isPending}
              onClick={() => allocate.mutate([track.id])}
            >
              Allocate ISRC
            </button>
          )}
          {allocate.isError && (
            <p className="mt-1 text-xs text-fail" role="alert">
              {allocate.error.message}
            </p>
          )}
        </div>
        {text('iswc', { mono: true, hint: 'T-DDD.DDD.DDD-C, for the composition' })}
        <div className="grid grid-cols-2 gap-2">
          {text('disc')}
          {text('side', { hint: 'Vinyl only' })}
        </div>
        <div className="flex items-center gap-2">
          <input type="checkbox" id="track-explicit" {...register('explicit')} />
          <label htmlFor="track-explicit" className="text-sm">
            Explicit lyrics
          </label>
        </div>
      </div>

      <fieldset className="mt-4">
        <legend className="text-xs font-medium uppercase tracking-wide text-slate">Credits</legend>
        {credits.fields.length === 0 && (
          <p className="text-sm text-slate">
            No credits yet. Add at least the composer; stores refuse tracks without one.
          </p>
        )}
        <ul className="mt-2 space-y-2">
          {credits.fields.map((field, index) => {
            const err = errors.credits?.[index];
            return (
              <li key={field.id} className="grid gap-2 sm:grid-cols-[1fr_12rem_12rem_auto]">
                <Field id={`credit-${index}-name`} label="Name" error={err?.name?.message}>
                  <input
                    {...register(`credits.${index}.name`)}
                    {...describedBy(`credit-${index}-name`, err?.name?.message)}
                    className={inputClass}
                  />
                </Field>
                <Field id={`credit-${index}-role`} label="Role" error={err?.role?.message}>
                  <select
                    {...register(`credits.${index}.role`)}
                    {...describedBy(`credit-${index}-role`, err?.role?.message)}
                    className={inputClass}
                  >
                    {CREDIT_ROLES.map((r) => (
                      <option key={r} value={r}>
                        {creditRoleLabels[r]}
                      </option>
                    ))}
                  </select>
                </Field>
                <Field
                  id={`credit-${index}-isni`}
                  label="ISNI (optional)"
                  error={err?.isni?.message}
                >
                  <input
                    {...register(`credits.${index}.isni`)}
                    {...describedBy(`credit-${index}-isni`, err?.isni?.message)}
                    className={`${inputClass} figures`}
                  />
                </Field>
                <button
                  type="button"
                  className={`${quietButtonClass} self-end`}
                  onClick={() => credits.remove(index)}
                  aria-label={`Remove credit ${index + 1}`}
                >
                  Remove
                </button>
              </li>
            );
          })}
        </ul>
        <button
          type="button"
          className={`${quietButtonClass} mt-2`}
          onClick={() => credits.append({ name: '', role: 'composer', isni: '' })}
        >
          Add credit
        </button>
      </fieldset>

      {patch.isError && (
        <div className="mt-4">
          <ErrorNote error={patch.error}>
            {isConflict(patch.error) && /changed/.test(patch.error.message) && (
              <button
                type="button"
                className={`${quietButtonClass} mt-2`}
                onClick={() => reload.mutate()}
                disabled={reload.isPending}
              >
                Load their changes (keeps what you typed)
              </button>
            )}
          </ErrorNote>
        </div>
      )}
      {theirChanges && (
        <p
          className="mt-4 rounded border border-warn/40 bg-warn/5 p-3 text-sm text-warn"
          role="status"
        >
          Loaded the latest version; they changed {theirChanges}. Your typed values are still in the
          form; save to apply them on top.
        </p>
      )}
      <div className="mt-4 flex gap-3">
        <button type="submit" className={buttonClass} disabled={!hydrated || patch.isPending}>
          {patch.isPending ? 'Saving…' : 'Save track'}
        </button>
        <button type="button" className={quietButtonClass} onClick={onClose}>
          Cancel
        </button>
      </div>
    </form>
  );
}
