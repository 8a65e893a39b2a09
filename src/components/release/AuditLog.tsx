import { useQuery } from '@tanstack/react-query';
import { auditResponseSchema } from '@/lib/api/workflow-schemas';
import { getJson } from '../api-client';
import { QueryProvider } from '../QueryProvider';
import { AuditRow } from './HistoryPanel';

function Log() {
  const query = useQuery({
    queryKey: ['audit'],
    queryFn: () => getJson('/api/audit', auditResponseSchema),
  });
  if (query.isPending) return <p className="text-slate">Loading…</p>;
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  if (query.data.events.length === 0) return <p className="text-slate">Nothing recorded yet.</p>;
  return (
    <ul className="divide-y divide-mist rounded-lg border border-mist bg-white">
      {query.data.events.map((e) => (
        <AuditRow key={e.id} event={e} showRelease />
      ))}
    </ul>
  );
}

export default function AuditLog() {
  return (
    <QueryProvider>
      <Log />
    </QueryProvider>
  );
}
