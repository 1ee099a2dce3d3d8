/**
 * A local fake of the lab's mail relay (development and tests): an `smtp-server` on
 * loopback that stores every message it receives in `outbox_mail`, where the admin's
 * "Caught e-mail" page shows it. Production sets SMTP_URL to a real relay instead.
 */
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import type pg from 'pg';

export interface FakeSmtp {
  port: number;
  url: string;
  close(): Promise<void>;
}

export async function startFakeSmtp(pool: pg.Pool, port = 0, log: (s: string) => void = () => {}): Promise<FakeSmtp> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    size: 2 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const to = session.envelope.rcptTo.map((r) => r.address).join(', ');
          const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : null;
          await pool.query('insert into outbox_mail(mail_from, mail_to, subject, body) values ($1, $2, $3, $4)', [
            from,
            to,
            mail.subject ?? null,
            mail.text ?? '',
          ]);
          callback();
        })
        .catch((e: Error) => {
          log(`fake SMTP could not store a message: ${e.message}`);
          callback(e);
        });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const actual = (server.server.address() as { port: number }).port;
  return {
    port: actual,
    url: `smtp://127.0.0.1:${actual}`,
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}
