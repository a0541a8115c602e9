/** The local mail server's Outbox (outside production): the messages it kept, for leads and the site owner. */
import type { OutboxMessage } from '../../shared/schemas/access';
import type { AppContext } from '../context';

/** Links in a message's text, for the Outbox. */
export function linksIn(text: string): string[] {
  return [...new Set(text.match(/https?:\/\/[^\s<>"')]+/g) ?? [])];
}

/** Whether the local Outbox may be read: never in production. */
export function outboxEnabled(ctx: AppContext): boolean {
  return ctx.config.env !== 'production';
}

export function outboxView(row: { id: number; mail_to: string; subject: string; text_body: string; received_at: string }): OutboxMessage {
  return {
    id: row.id,
    to: row.mail_to,
    subject: row.subject,
    text: row.text_body,
    links: linksIn(row.text_body),
    receivedAt: row.received_at,
  };
}

/** The newest 200 messages: about one federation (by slug), or all of them for the site owner. */
export async function outboxMessages(ctx: AppContext, federationSlug: string | null): Promise<OutboxMessage[]> {
  let q = ctx.db.selectFrom('outbox_messages').select(['id', 'mail_to', 'subject', 'text_body', 'received_at']);
  if (federationSlug !== null) q = q.where('federation_slug', '=', federationSlug);
  const rows = await q.orderBy('id', 'desc').limit(200).execute();
  return rows.map(outboxView);
}
