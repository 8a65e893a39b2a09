import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { profileListSchema } from '@/lib/api/checks-schemas';
import { formatDate, formatDuration } from '@/lib/api/format';
import {
  type ReleaseFields,
  type ReleaseFieldsInput,
  releaseFieldsSchema,
} from '@/lib/api/metadata-schemas';
import { type ReleaseDetail, releaseDetailSchema } from '@/lib/api/schemas';
import { can } from '@/lib/auth/permissions';
import { BUILT_IN_PROFILES } from '@/lib/specs/profiles';
import { getJson, sendJson } from '../api-client';
import type { PanelProps } from '../release/workspace-types';
import { releaseQueryKey } from '../release/workspace-types';
import { useHydrated } from '../use-hydrated';
import { ArtworkPanel } from './ArtworkPanel';
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
import { isLockedState, lockedNotice } from './locking';
import { storeRelease } from './track-api';

function Fact({
  label,
  value,
  mono = false,
  testId,
}: {
  label: string;
  value: string;
  mono?: boolean;
  testId?: string;
}) {
  return (
    <div>
      <dt className="text-xs uppercase tracking-wide text-slate">{label}</dt>
      <dd className={mono ? 'figures' : undefined} data-testid={testId}>
        {value}
      </dd>
    </div>
  );
}

/** Release-level metadata: identifiers, dates, ℗/© lines, target profiles; editable by coordinators. */
export function ReleaseFactsPanel({ release: r, role }: PanelProps) {
  const [editing, setEditing] = useState(false);
  const hydrated = useHydrated();
  const mayEdit = can(role, 'metadata:edit');
  const locked = isLockedState(r.state);
  if (editing && mayEdit) {
    return <ReleaseForm release={r} onClose={() => setEditing(false)} />;
  }
  return (
    <div className="rounded-lg border border-mist bg-white p-4">
      <dl className="grid grid-cols-2 gap-4 sm:grid-cols-4">
        <Fact label="Catalogue number" value={r.catalogueNumber ?? '–'} mono />
        <Fact label="UPC/EAN" value={r.upcEan ?? 'Not entered'} mono testId="fact-upc" />
        <Fact label="Release date" value={formatDate(r.releaseDate)} mono />
        <Fact label="Original release" value={formatDate(r.originalReleaseDate)} mono />
        <Fact label="Genre" value={r.genre ?? '–'} testId="fact-genre" />
        <Fact label="Language" value={r.language ?? '–'} />
        <Fact label="℗ line" value={r.pLine ? `℗ ${r.pLine}` : '–'} />
        <Fact label="© line" value={r.cLine ? `© ${r.cLine}` : '–'} />
        <Fact label="Explicit" value={r.explicit ? 'Yes' : 'No'} />
        <Fact
          label="Target profiles"
          value={r.profiles.map((p) => p.name).join(' · ') || 'None chosen'}
        />
        <Fact label="Running time" value={formatDuration(r.totalDurationSeconds)} mono />
      </dl>
      <ArtworkPanel release={r} role={role} />
      {mayEdit && (
        <div className="mt-4 flex items-center gap-3">
          <button
            type="button"
            className={quietButtonClass}
            disabled={!hydrated || locked}
            onClick={() => setEditing(true)}
          >
            Edit release details
          </button>
          {locked && <p className="text-sm text-slate">{lockedNotice(r.state)}</p>}
        </div>
      )}
    </div>
  );
}

function toFormValues(r: ReleaseDetail): ReleaseFieldsInput {
  return {
    title: r.title,
    artist: r.artist,
    labelName: r.labelName,
    catalogueNumber: r.catalogueNumber ?? '',
    upcEan: r.upcEan ?? '',
    releaseDate: r.releaseDate ?? '',
    originalReleaseDate: r.originalReleaseDate ?? '',
    genre: r.genre ?? '',
    language: r.language ?? '',
    pLine: r.pLine ?? '',
    cLine: r.cLine ?? '',
    explicit: r.explicit,
    profileIds: r.profiles.map((p) => p.id),
  };
}

const fieldLabels: Record<keyof ReleaseFieldsInput, string> = {
  title: 'Title',
  artist: 'Primary artist(s)',
  labelName: 'Label',
  catalogueNumber: 'Catalogue number',
  upcEan: 'UPC/EAN',
  releaseDate: 'Release date',
  originalReleaseDate: 'Original release date',
  genre: 'Genre',
  language: 'Language',
  pLine: '℗ line',
  cLine: '© line',
  explicit: 'Explicit',
  profileIds: 'Target profiles',
};

/** Fields whose saved value differs between two loads of the release (what someone else changed). */
function changedFields(before: ReleaseDetail, after: ReleaseDetail): string[] {
  const a = toFormValues(before);
  const b = toFormValues(after);
  return (Object.keys(a) as (keyof ReleaseFieldsInput)[])
    .filter((k) => JSON.stringify(a[k]) !== JSON.stringify(b[k]))
    .map((k) => `${fieldLabels[k]}: ${String(b[k] || '–')}`);
}

function ReleaseForm({ release, onClose }: { release: ReleaseDetail; onClose: () => void }) {
  const hydrated = useHydrated();
  const client = useQueryClient();
  // Built-in profiles at once; the label's own ones join them when the list arrives.
  const profileList = useQuery({
    queryKey: ['profiles'],
    queryFn: () => getJson('/api/profiles', profileListSchema),
  });
  const choices = profileList.data?.profiles.map((e) => e.profile) ?? BUILT_IN_PROFILES;
  // The release as it was when the form opened (or was last reloaded): its version is what we send.
  const [basis, setBasis] = useState(release);
  const [theirChanges, setTheirChanges] = useState<string[] | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    resetField,
    formState: { errors, dirtyFields },
  } = useForm<ReleaseFieldsInput, unknown, ReleaseFields>({
    resolver: zodResolver(releaseFieldsSchema),
    defaultValues: toFormValues(release),
  });
  const save = useMutation({
    mutationFn: (values: ReleaseFields) =>
      sendJson(
        'PATCH',
        `/api/releases/${encodeURIComponent(basis.id)}/metadata`,
        { ...values, version: basis.version },
        releaseDetailSchema,
      ),
    onSuccess: (saved) => {
      storeRelease(client, saved);
      onClose();
    },
    onError: (error) => {
      for (const issue of fieldIssues(error)) {
        const name = issue.path.split('.')[0] as keyof ReleaseFieldsInput;
        if (name in fieldLabels) setError(name, { message: issue.message });
      }
    },
  });
  const reload = useMutation({
    mutationFn: () => getJson(`/api/releases/${encodeURIComponent(basis.id)}`, releaseDetailSchema),
    onSuccess: (latest) => {
      client.setQueryData(releaseQueryKey(latest.id), latest);
      // Fields the user has not touched take the saved values; typed ones stay as typed.
      const fresh = toFormValues(latest);
      for (const name of Object.keys(fresh) as (keyof ReleaseFieldsInput)[]) {
        if (!dirtyFields[name]) resetField(name, { defaultValue: fresh[name] });
      }
      setTheirChanges(changedFields(basis, latest));
      setBasis(latest);
      save.reset();
    },
  });

  const text = (name: keyof ReleaseFieldsInput, opts: { hint?: string; mono?: boolean } = {}) => {
    const id = `release-${name}`;
    const error = errors[name]?.message;
    return (
      <Field id={id} label={fieldLabels[name]} error={error} hint={opts.hint}>
        <input
          {...register(name)}
          {...describedBy(id, error, opts.hint)}
          className={`${inputClass}${opts.mono ? ' figures' : ''}`}
          autoComplete="off"
        />
      </Field>
    );
  };

  return (
    <form
      aria-label="Release details"
      noValidate
      onSubmit={handleSubmit((values) => save.mutate(values))}
      className="rounded-lg border border-mist bg-white p-4"
    >
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {text('title')}
        {text('artist', { hint: 'As shown on the cover, e.g. "Mira Ostrander & The Swell"' })}
        {text('labelName')}
        {text('catalogueNumber', { mono: true })}
        {text('upcEan', { mono: true, hint: 'UPC-A (12 digits) or EAN-13 (13 digits)' })}
        {text('releaseDate', { mono: true, hint: 'YYYY-MM-DD' })}
        {text('originalReleaseDate', { mono: true, hint: 'For reissues; YYYY-MM-DD' })}
        {text('genre')}
        {text('language', { hint: 'Code such as en, fr or pt-BR' })}
        {text('pLine', { hint: 'Year and owner of the recording, e.g. 2026 Brackwater Sound' })}
        {text('cLine', { hint: 'Year and owner of the artwork and text' })}
        <div className="flex items-center gap-2 self-end pb-2">
          <input type="checkbox" id="release-explicit" {...register('explicit')} />
          <label htmlFor="release-explicit" className="text-sm">
            Explicit content
          </label>
        </div>
      </div>
      <fieldset className="mt-4">
        <legend className="text-xs font-medium uppercase tracking-wide text-slate">
          Target profiles
        </legend>
        <p className="text-xs text-slate">
          Built-in starting points and the label's own profiles (an admin makes them under
          Profiles).
        </p>
        <div className="mt-2 grid gap-1 sm:grid-cols-2">
          {choices.map((p) => (
            <label key={p.id} className="flex items-center gap-2 text-sm">
              <input type="checkbox" value={p.id} {...register('profileIds')} />
              {p.name}
            </label>
          ))}
        </div>
        {errors.profileIds?.message && (
          <p className="mt-1 text-xs text-fail">{errors.profileIds.message}</p>
        )}
      </fieldset>
      {save.isError && (
        <div className="mt-4">
          <ErrorNote error={save.error}>
            {isConflict(save.error) && !isLockedState(basis.state) && (
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
        <div
          className="mt-4 rounded border border-warn/40 bg-warn/5 p-3 text-sm text-warn"
          role="status"
          data-testid="their-changes"
        >
          <p>
            Loaded the latest version.{' '}
            {theirChanges.length > 0
              ? `They changed: ${theirChanges.join('; ')}.`
              : 'Their change did not touch these fields.'}{' '}
            Your typed values are still in the form; the other fields now show the saved values.
            Save to apply yours on top.
          </p>
        </div>
      )}
      <div className="mt-4 flex gap-3">
        <button type="submit" className={buttonClass} disabled={!hydrated || save.isPending}>
          {save.isPending ? 'Saving…' : 'Save release details'}
        </button>
        <button type="button" className={quietButtonClass} onClick={onClose}>
          Cancel
        </button>
      </div>
    </form>
  );
}
