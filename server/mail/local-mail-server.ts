import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import type { Db } from '../db/connection';
import { parseMessage } from './parse-message';

export interface LocalMailServer {
  port: number;
  close(): Promise<void>;
}

/** The most a stored message may weigh; our own messages are a few kilobytes. */
const MAX_MESSAGE_BYTES = 2 * 1024 * 1024;

/**
 * A fake SMTP server on loopback (a free port) that stores every message it receives in the
 * `outbox_messages` table, so e-mailed links work end to end in development, tests and the demo
 * without a hosted service. It accepts no authentication and listens on 127.0.0.1 only.
 */
export async function startLocalMailServer(db: Db): Promise<LocalMailServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    size: MAX_MESSAGE_BYTES,
    banner: 'Panelwise local mail server (development only)',
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', callback);
      stream.on('end', () => {
        if (stream.sizeExceeded) return callback(Object.assign(new Error('Message too large'), { responseCode: 552 }));
        const raw = Buffer.concat(chunks).toString('utf8');
        const parsed = parseMessage(raw);
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(', ');
        const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
        // The message is stored before the server answers 250, so a sender that awaited its
        // send finds it in the outbox.
        db.insertInto('outbox_messages')
          .values({
            federation_slug: parsed.headers.get('x-panelwise-federation') ?? null,
            mail_from: parsed.from || envelopeFrom,
            mail_to: envelopeTo || parsed.to,
            subject: parsed.subject,
            text_body: parsed.text,
            html_body: parsed.html,
            raw,
          })
          .execute()
          .then(
            () => callback(),
            (error: Error) => callback(error),
          );
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  const { port } = server.server.address() as AddressInfo;
  return {
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
