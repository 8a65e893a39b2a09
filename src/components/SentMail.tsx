import { useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { getJson } from './api-client';
import { QueryProvider } from './QueryProvider';

const schema = z.object({
  messages: z.array(
    z.object({
      id: z.string(),
      receivedAt: z.string(),
      from: z.string(),
      to: z.array(z.string()),
      subject: z.string(),
      text: z.string(),
    }),
  ),
});

/** Turns bare URLs in a plain-text mail into links. */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/\S+)/g);
  return (
    <>
      {parts.map((part, i) =>
        /^https?:\/\//.test(part) ? (
          // biome-ignore lint/suspicious/noArrayIndexKey: parts of one fixed string
          <a key={i} href={part} className="break-all text-buoy underline">
            {part}
          </a>
        ) : (
          part
        ),
      )}
    </>
  );
}

function SentMailBody() {
  const query = useQuery({
    queryKey: ['mail'],
    queryFn: () => getJson('/api/dev/mail', schema),
    refetchInterval: 5000,
  });
  if (query.isPending) return <p className="text-slate">Loading…</p>;
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  if (query.data.messages.length === 0) {
    return (
      <p className="rounded border border-dashed border-slate-light p-8 text-center text-slate">
        No mail sent yet. Invitations and notifications appear here.
      </p>
    );
  }
  return (
    <ul className="space-y-4" data-testid="mail-list">
      {query.data.messages.map((m) => (
        <li
          key={m.id}
          className="rounded-lg border border-mist bg-white p-4"
          data-testid="mail-item"
        >
          <div className="flex flex-wrap justify-between gap-2 text-sm text-slate">
            <span>
              To <span className="figures">{m.to.join(', ')}</span>
            </span>
            <time className="figures" dateTime={m.receivedAt}>
              {m.receivedAt.replace('T', ' ').slice(0, 19)} UTC
            </time>
          </div>
          <h2 className="mt-1 font-medium">{m.subject}</h2>
          <pre className="mt-2 whitespace-pre-wrap font-sans text-sm">
            <Linkified text={m.text} />
          </pre>
        </li>
      ))}
    </ul>
  );
}

export default function SentMail() {
  return (
    <QueryProvider>
      <SentMailBody />
    </QueryProvider>
  );
}
