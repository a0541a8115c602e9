import type { OutboxMessage } from '../../shared/schemas/access';
import { formatDateTime } from '../lib/format';

/** Messages kept by the local mail server, newest first, with their links. */
export function OutboxList({ messages }: { messages: OutboxMessage[] }) {
  if (messages.length === 0) return <p className="text-muted">No e-mail yet.</p>;
  return (
    <ol className="space-y-3" aria-label="Messages">
      {messages.map((m) => (
        <li key={m.id} className="card space-y-2">
          <article aria-labelledby={`message-${m.id}`}>
            <h3 id={`message-${m.id}`} className="text-base font-semibold">
              {m.subject}
            </h3>
            <p className="text-sm text-muted">
              To {m.to} · {formatDateTime(m.receivedAt)}
            </p>
            {m.links.length > 0 ? (
              <ul className="mt-2 space-y-1">
                {m.links.map((link) => (
                  <li key={link}>
                    <a href={link} className="break-all text-harbour underline" data-testid="outbox-link">
                      {link}
                    </a>
                  </li>
                ))}
              </ul>
            ) : null}
            <details className="mt-2 text-sm">
              <summary className="cursor-pointer text-muted">The whole message</summary>
              <pre className="mt-2 whitespace-pre-wrap font-sans">{m.text}</pre>
            </details>
          </article>
        </li>
      ))}
    </ol>
  );
}
