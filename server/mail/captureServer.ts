// The local fake SMTP server for development and tests: smtp-server on a loopback port, STARTTLS
// off, authentication optional. Each received message is parsed and stored in mail_outbox: on the
// row it was sent from (matched by the X-Ringwell-Outbox-Id header), or as a new 'captured' row.
import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import { eq } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { mailOutbox } from '../../db/schema';
import { OUTBOX_ID_HEADER } from './mailer';
import { parseMail } from './mime';

export interface CaptureServer {
  port: number;
  /** The SMTP URL a mailer uses to reach it. */
  url: string;
  /** Resolves when every message received so far has been stored. */
  settled(): Promise<void>;
  close(): Promise<void>;
}

const MAX_MESSAGE_BYTES = 5 * 1024 * 1024;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function startCaptureServer(options: {
  db: Database;
  port?: number;
  host?: string;
  log?: (message: string, error?: unknown) => void;
}): Promise<CaptureServer> {
  const host = options.host ?? '127.0.0.1';
  const pending = new Set<Promise<void>>();

  async function store(raw: Buffer, envelopeTo: string[]): Promise<void> {
    const mail = parseMail(raw);
    const received = { from: mail.from, to: mail.to, subject: mail.subject, text: mail.text, html: mail.html, bytes: raw.length };
    const outboxId = mail.headers[OUTBOX_ID_HEADER.toLowerCase()];
    if (outboxId && UUID.test(outboxId)) {
      const updated = await options.db
        .update(mailOutbox)
        .set({ receivedAt: new Date(), received })
        .where(eq(mailOutbox.id, outboxId))
        .returning({ id: mailOutbox.id });
      if (updated.length > 0) return;
    }
    await options.db.insert(mailOutbox).values({
      toAddress: envelopeTo.join(', ') || mail.to.join(', '),
      subject: mail.subject,
      text: mail.text ?? '',
      html: mail.html,
      status: 'captured',
      receivedAt: new Date(),
      received,
    });
  }

  const server = new SMTPServer({
    secure: false,
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    logger: false,
    banner: 'Ringwell local mail capture',
    size: MAX_MESSAGE_BYTES,
    onAuth(auth, _session, callback) {
      callback(null, { user: auth.username ?? 'local' });
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          callback(Object.assign(new Error('Message is larger than the capture server accepts.'), { responseCode: 552 }));
          return;
        }
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
        const job = store(Buffer.concat(chunks), envelopeTo)
          .catch((error) => options.log?.('could not store a captured message', error))
          .finally(() => pending.delete(job));
        pending.add(job);
        // Answer only once stored, so that a sent message is in the table when the send resolves.
        job.then(() => callback(), callback);
      });
    },
  });

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', (error) => options.log?.('mail capture server error', error));
  const port = ((server as unknown as { server: { address(): AddressInfo } }).server.address() as AddressInfo).port;

  return {
    port,
    url: `smtp://${host}:${port}`,
    async settled() {
      while (pending.size > 0) await Promise.all([...pending]);
    },
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
      }),
  };
}
