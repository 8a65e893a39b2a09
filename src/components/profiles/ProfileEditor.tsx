import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import {
  type ProfileEntryView,
  profileEntrySchema,
  profileListSchema,
} from '@/lib/api/checks-schemas';
import { RULE_TITLES } from '@/lib/specs/rule-titles';
import { type DeliveryRules, deliveryRulesSchema, type RuleId } from '@/lib/specs/schema';
import { ApiRequestError, getJson, sendJson } from '../api-client';
import { QueryProvider } from '../QueryProvider';
import { type RuleField, ruleFields, ruleGroups } from './rule-fields';

interface RuleDraft {
  enabled: boolean;
  severity: 'failure' | 'warning';
  values: Record<string, string | boolean>;
}
type Draft = Record<RuleId, RuleDraft>;

const allRuleIds = ruleGroups.flatMap((g) => g.rules);

function toDraft(rules: DeliveryRules): Draft {
  const draft = {} as Draft;
  for (const id of allRuleIds) {
    const rule = rules[id] as Record<string, unknown> | undefined;
    const values: Record<string, string | boolean> = {};
    for (const field of ruleFields[id]) {
      const v = rule?.[field.name];
      if (field.kind === 'boolean') values[field.name] = v === true;
      else if (Array.isArray(v)) values[field.name] = v.join(', ');
      else values[field.name] = v === undefined ? '' : String(v);
    }
    draft[id] = {
      enabled: rule !== undefined,
      severity: rule?.severity === 'warning' ? 'warning' : 'failure',
      values,
    };
  }
  return draft;
}

function parseField(field: RuleField, raw: string | boolean): unknown {
  if (field.kind === 'boolean') return raw === true;
  const text = String(raw).trim();
  if (text === '') return undefined;
  if (field.kind === 'number' || field.kind === 'integer') {
    const n = Number(text.replace('−', '-'));
    return Number.isNaN(n) ? text : n;
  }
  const parts = text.split(/[,\s]+/).filter(Boolean);
  if (field.kind === 'numbers') return parts.map((p) => (Number.isNaN(Number(p)) ? p : Number(p)));
  if (field.kind === 'strings') return parts.map((p) => p.toLowerCase());
  return text;
}

/** Draft → rules object as typed; the schema decides whether it is valid. */
function fromDraft(draft: Draft): Record<string, unknown> {
  const rules: Record<string, unknown> = {};
  for (const id of allRuleIds) {
    const rule = draft[id];
    if (!rule.enabled) continue;
    const out: Record<string, unknown> = { severity: rule.severity };
    for (const field of ruleFields[id]) {
      const value = parseField(field, rule.values[field.name] ?? '');
      if (value !== undefined) out[field.name] = value;
    }
    rules[id] = out;
  }
  return rules;
}

function RuleEditor({
  id,
  rule,
  readOnly,
  errors,
  onChange,
}: {
  id: RuleId;
  rule: RuleDraft;
  readOnly: boolean;
  errors: Record<string, string>;
  onChange: (next: RuleDraft) => void;
}) {
  const ruleError = errors[id];
  const input =
    'w-28 rounded border border-slate-light bg-white px-2 py-1 text-sm figures disabled:bg-paper';
  return (
    <div
      className={`rounded border p-3 ${rule.enabled ? 'border-slate-light bg-white' : 'border-mist bg-paper'}`}
      data-rule={id}
    >
      <div className="flex flex-wrap items-center gap-3">
        <label className="flex items-center gap-2 font-medium">
          <input
            type="checkbox"
            checked={rule.enabled}
            disabled={readOnly}
            onChange={(e) => onChange({ ...rule, enabled: e.target.checked })}
          />
          <span className="first-letter:uppercase">{RULE_TITLES[id]}</span>
        </label>
        {rule.enabled && (
          <label className="ml-auto text-sm">
            <span className="sr-only">Severity of {RULE_TITLES[id]}</span>
            <select
              className="rounded border border-slate-light bg-white px-2 py-1 text-sm"
              value={rule.severity}
              disabled={readOnly}
              onChange={(e) =>
                onChange({ ...rule, severity: e.target.value as RuleDraft['severity'] })
              }
            >
              <option value="failure">■ Failure when broken</option>
              <option value="warning">▲ Warning when broken</option>
            </select>
          </label>
        )}
      </div>
      {rule.enabled && ruleFields[id].length > 0 && (
        <div className="mt-2 flex flex-wrap gap-x-5 gap-y-2">
          {ruleFields[id].map((field) => {
            const fieldId = `rule-${id}-${field.name}`;
            const error = errors[`${id}.${field.name}`];
            const value = rule.values[field.name];
            const set = (v: string | boolean) =>
              onChange({ ...rule, values: { ...rule.values, [field.name]: v } });
            return (
              <div key={field.name} className="text-sm">
                <label htmlFor={fieldId} className="block text-xs text-slate">
                  {field.label}
                  {field.optional ? ' (optional)' : ''}
                </label>
                {field.kind === 'boolean' ? (
                  <input
                    id={fieldId}
                    type="checkbox"
                    checked={value === true}
                    disabled={readOnly}
                    onChange={(e) => set(e.target.checked)}
                  />
                ) : field.kind === 'choice' ? (
                  <select
                    id={fieldId}
                    className={input}
                    value={String(value ?? '')}
                    disabled={readOnly}
                    onChange={(e) => set(e.target.value)}
                  >
                    {field.optional && <option value="">–</option>}
                    {field.choices?.map((c) => (
                      <option key={c} value={c}>
                        {c}
                      </option>
                    ))}
                  </select>
                ) : (
                  <span className="flex items-center gap-1">
                    <input
                      id={fieldId}
                      className={
                        field.kind === 'numbers' || field.kind === 'strings'
                          ? `${input} w-52`
                          : input
                      }
                      value={String(value ?? '')}
                      disabled={readOnly}
                      inputMode={field.kind === 'strings' ? 'text' : 'decimal'}
                      placeholder={field.hint}
                      aria-invalid={error ? true : undefined}
                      aria-describedby={error ? `${fieldId}-error` : undefined}
                      onChange={(e) => set(e.target.value)}
                    />
                    {field.unit && <span className="text-xs text-slate">{field.unit}</span>}
                  </span>
                )}
                {error && (
                  <p id={`${fieldId}-error`} className="mt-0.5 text-xs text-fail">
                    {error}
                  </p>
                )}
              </div>
            );
          })}
        </div>
      )}
      {rule.enabled && ruleError && <p className="mt-1 text-xs text-fail">{ruleError}</p>}
    </div>
  );
}

function Editor({ entry, canEdit }: { entry: ProfileEntryView; canEdit: boolean }) {
  const client = useQueryClient();
  const readOnly = entry.builtIn || !canEdit;
  const [name, setName] = useState(entry.profile.name);
  const [description, setDescription] = useState(entry.profile.description);
  const [draft, setDraft] = useState(() => toDraft(entry.profile.rules));
  const [version, setVersion] = useState(entry.profile.version);
  const [errors, setErrors] = useState<Record<string, string>>({});
  // The form as last saved; the "Saved" note shows only while nothing has changed since.
  const [savedSnapshot, setSavedSnapshot] = useState<string | null>(null);
  const snapshot = JSON.stringify({ name, description, draft });
  const saved = savedSnapshot === snapshot;

  const save = useMutation({
    mutationFn: (rules: DeliveryRules) =>
      sendJson(
        'PUT',
        `/api/profiles/${encodeURIComponent(entry.profile.id)}`,
        { name, description, rules, version },
        profileEntrySchema,
      ),
    onSuccess: (next) => {
      setVersion(next.profile.version);
      setSavedSnapshot(snapshot);
      void client.invalidateQueries({ queryKey: ['profiles'] });
    },
  });

  function submit(event: React.FormEvent) {
    event.preventDefault();
    const parsed = deliveryRulesSchema.safeParse(fromDraft(draft));
    if (!parsed.success) {
      const next: Record<string, string> = {};
      for (const issue of parsed.error.issues) next[issue.path.join('.')] ??= issue.message;
      setErrors(next);
      return;
    }
    setErrors({});
    save.mutate(parsed.data);
  }

  const enabledCount = allRuleIds.filter((id) => draft[id].enabled).length;
  return (
    <form onSubmit={submit} noValidate className="space-y-6" aria-label="Profile rules">
      <div className="grid gap-4 rounded-lg border border-mist bg-white p-4 sm:grid-cols-2">
        <div>
          <label htmlFor="profile-name" className="block text-sm font-medium">
            Name
          </label>
          <input
            id="profile-name"
            className="mt-1 w-full rounded border border-slate-light px-3 py-2 disabled:bg-paper"
            value={name}
            disabled={readOnly}
            onChange={(e) => setName(e.target.value)}
          />
        </div>
        <div>
          <label htmlFor="profile-description" className="block text-sm font-medium">
            Description
          </label>
          <input
            id="profile-description"
            className="mt-1 w-full rounded border border-slate-light px-3 py-2 disabled:bg-paper"
            value={description}
            disabled={readOnly}
            onChange={(e) => setDescription(e.target.value)}
          />
        </div>
        <p className="text-sm text-slate sm:col-span-2">
          {enabledCount} of {allRuleIds.length} rules on · version{' '}
          <span className="figures">{version}</span>
          {entry.basedOn && (
            <>
              {' '}
              · copied from <span className="figures">{entry.basedOn}</span>
            </>
          )}
          {entry.builtIn && ' · built in: copy it to make a version of your own'}
        </p>
      </div>
      {ruleGroups.map((group) => (
        <fieldset key={group.title} className="space-y-2">
          <legend className="mb-1 text-sm font-semibold uppercase tracking-wide text-slate">
            {group.title}
          </legend>
          {group.rules.map((id) => (
            <RuleEditor
              key={id}
              id={id}
              rule={draft[id]}
              readOnly={readOnly}
              errors={errors}
              onChange={(next) => setDraft((d) => ({ ...d, [id]: next }))}
            />
          ))}
        </fieldset>
      ))}
      {!readOnly && (
        <div
          className="sticky bottom-0 flex items-center gap-4 border-t border-mist bg-paper py-3"
          aria-live="polite"
        >
          <button
            type="submit"
            disabled={save.isPending}
            className="rounded bg-buoy px-4 py-2 font-medium text-white hover:bg-buoy-dark disabled:opacity-60"
          >
            {save.isPending ? 'Saving…' : 'Save profile'}
          </button>
          {Object.keys(errors).length > 0 && (
            <p role="alert" className="text-sm text-fail">
              Some values are not valid; see the messages beside them.
            </p>
          )}
          {save.isError && (
            <p role="alert" className="text-sm text-fail">
              {save.error.message}
              {save.error instanceof ApiRequestError && save.error.status === 409 && (
                <button
                  type="button"
                  className="ml-2 underline"
                  onClick={() => window.location.reload()}
                >
                  Reload
                </button>
              )}
            </p>
          )}
          {saved && <p className="text-sm text-pass">Saved as version {version}.</p>}
        </div>
      )}
    </form>
  );
}

function EditorLoader({ profileId, canEdit }: { profileId: string; canEdit: boolean }) {
  const query = useQuery({
    queryKey: ['profiles'],
    queryFn: () => getJson('/api/profiles', profileListSchema),
  });
  if (query.isPending) return <p className="text-slate">Loading profile…</p>;
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  const entry = query.data.profiles.find((p) => p.profile.id === profileId);
  if (!entry)
    return (
      <p role="alert">
        No such profile.{' '}
        <a className="underline" href="/profiles">
          Back to profiles
        </a>
      </p>
    );
  return <Editor entry={entry} canEdit={canEdit} />;
}

export default function ProfileEditor(props: { profileId: string; canEdit: boolean }) {
  return (
    <QueryProvider>
      <EditorLoader {...props} />
    </QueryProvider>
  );
}
