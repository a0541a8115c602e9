import { useCurrentFederation } from '../../../lib/use-federation';
import { usePageTitle } from '../../../lib/page-title';
import { QueryState } from '../../../components/query-state';
import { useOutbox } from '../api/get-outbox';
import { OutboxList } from '../../../components/outbox-list';

/** The e-mails about this federation kept by the local mail server (never in production). */
export function OutboxPage() {
  const { federation } = useCurrentFederation();
  const outbox = useOutbox(federation.slug);
  usePageTitle('Outbox');
  return (
    <div className="space-y-4">
      <h1>Outbox</h1>
      <p className="text-muted">
        Outside production Panelwise delivers no e-mail: a mail server inside the app keeps every message, so invitations and password
        resets work end to end. These are the messages about {federation.name}.
      </p>
      <button type="button" className="btn btn-quiet" onClick={() => void outbox.refetch()}>
        Refresh
      </button>
      <QueryState query={outbox} what="The Outbox">
        {(messages) => <OutboxList messages={messages} />}
      </QueryState>
    </div>
  );
}
