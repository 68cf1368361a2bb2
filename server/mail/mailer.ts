import crypto from 'node:crypto';
import nodemailer, { type Transporter } from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import type { Logger } from 'pino';
import type { Config } from '../env';
import type { Db } from '../db/client';
import { outbox } from '../db/schema/admin';

const FAKE_SMTP_USER = 'lumenbook';

export interface Mailer {
  send(message: { to: string; subject: string; text: string }): Promise<void>;
  /**
   * Sends without making the caller wait: an answer that waits for the mail server would tell, by its
   * time, whether there was anything to send (e.g. whether an account exists). Failures go to the log.
   */
  sendInBackground(message: { to: string; subject: string; text: string }): void;
  /** Resolves when every background send has finished (tests, shutdown). */
  settled(): Promise<void>;
  close(): Promise<void>;
  /** Where the fake SMTP server listens, when it is the one in use. */
  fakeSmtpPort: number | null;
}

/**
 * Mail goes through nodemailer over real SMTP. Without SMTP settings (the default everywhere but a
 * configured production) we start an in-process SMTP server on 127.0.0.1 that files every message in
 * the `outbox` table, so invitations and resets work on a fresh clone and nothing leaves the machine.
 */
export async function createMailer(config: Pick<Config, 'smtp' | 'mailFrom'>, db: Db, logger: Logger): Promise<Mailer> {
  let fake: SMTPServer | null = null;
  let transport: Transporter;
  let fakeSmtpPort: number | null = null;

  if (config.smtp) {
    transport = nodemailer.createTransport({
      host: config.smtp.host,
      port: config.smtp.port,
      secure: config.smtp.secure,
      auth: config.smtp.user ? { user: config.smtp.user, pass: config.smtp.pass ?? '' } : undefined,
    });
  } else {
    // Only the app's own mail goes into the outbox: any local process can reach 127.0.0.1, so the
    // server demands AUTH with a secret made at start and known only to this process's transport.
    const secret = crypto.randomBytes(24).toString('base64url');
    fake = new SMTPServer({
      authOptional: false,
      authMethods: ['PLAIN', 'LOGIN'],
      // Loopback only, and the secret lives one process long: TLS would add nothing here.
      allowInsecureAuth: true,
      disabledCommands: ['STARTTLS'],
      logger: false,
      onAuth(auth, _session, callback) {
        const given = Buffer.from(`${auth.username ?? ''}:${auth.password ?? ''}`);
        const expected = Buffer.from(`${FAKE_SMTP_USER}:${secret}`);
        if (given.length === expected.length && crypto.timingSafeEqual(given, expected)) return callback(null, { user: FAKE_SMTP_USER });
        callback(new Error('Authentication refused: this server takes mail from Lumenbook only'));
      },
      onData(stream, _session, callback) {
        // mailparser (with its HTML and charset libraries) is loaded with the first message, not at start:
        // it is the heaviest module the server would otherwise hold from start (bench/server-memory.ts).
        import('mailparser')
          .then(({ simpleParser }) => simpleParser(stream))
          .then((parsed) => {
            const to = Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(', ') : (parsed.to?.text ?? '');
            db.insert(outbox)
              .values({
                fromAddress: parsed.from?.text ?? '',
                toAddress: to,
                subject: parsed.subject ?? '',
                textBody: parsed.text ?? '',
                raw: parsed.textAsHtml ?? parsed.text ?? '',
              })
              .run();
            callback();
          })
          .catch((err: Error) => callback(err));
      },
    });
    const server = fake;
    fakeSmtpPort = await new Promise<number>((resolve, reject) => {
      server.once('error', reject);
      server.listen(0, '127.0.0.1', () => {
        const addr = server.server.address();
        resolve(typeof addr === 'object' && addr ? addr.port : 0);
      });
    });
    transport = nodemailer.createTransport({
      host: '127.0.0.1',
      port: fakeSmtpPort,
      secure: false,
      ignoreTLS: true,
      auth: { user: FAKE_SMTP_USER, pass: secret },
    });
    logger.info({ port: fakeSmtpPort }, 'fake SMTP server files outgoing mail in the outbox');
  }

  const pending = new Set<Promise<void>>();
  const send = async ({ to, subject, text }: { to: string; subject: string; text: string }) => {
    await transport.sendMail({ from: config.mailFrom, to, subject, text });
  };
  const settled = async () => {
    while (pending.size) await Promise.allSettled([...pending]);
  };

  return {
    fakeSmtpPort,
    send,
    sendInBackground(message) {
      const p: Promise<void> = send(message)
        .catch((err: unknown) => logger.error({ err, subject: message.subject }, 'mail could not be sent'))
        .finally(() => pending.delete(p));
      pending.add(p);
    },
    settled,
    async close() {
      await settled();
      transport.close();
      if (fake) await new Promise<void>((resolve) => fake!.close(() => resolve()));
    },
  };
}
