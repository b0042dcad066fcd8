import nodemailer from 'nodemailer';
import type { Config } from '../config';
import { startMailCatcher, type CaughtMail } from './catcher';

export type Mail = { to: string; subject: string; text: string };
export type Mailer = { send(mail: Mail): Promise<void>; caught?: CaughtMail[]; close(): Promise<void> };

/** SMTP when configured; otherwise (development, tests) a local catcher receives everything. */
export async function createMailer(config: Config): Promise<Mailer> {
  if (config.smtpUrl) {
    const transport = nodemailer.createTransport(config.smtpUrl);
    return {
      async send(mail) {
        await transport.sendMail({ from: config.mailFrom, ...mail });
      },
      async close() {
        transport.close();
      },
    };
  }
  const catcher = await startMailCatcher(config.env === 'test' ? undefined : config.mailCatchDir);
  const transport = nodemailer.createTransport({ host: '127.0.0.1', port: catcher.port, secure: false, ignoreTLS: true });
  return {
    caught: catcher.messages,
    async send(mail) {
      await transport.sendMail({ from: config.mailFrom, ...mail });
    },
    async close() {
      transport.close();
      await catcher.close();
    },
  };
}
