import { SMTPServer } from 'smtp-server';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export type CaughtMail = { from: string; to: string[]; subject: string; text: string; raw: string; receivedAt: Date };

/** Undoes quoted-printable soft breaks and escapes, enough to read links in caught mail. */
function decodeQuotedPrintable(s: string): string {
  return s
    .replace(/=\r?\n/g, '')
    .replace(/=([0-9A-F]{2})/gi, (_, h: string) => String.fromCharCode(parseInt(h, 16)));
}

function parse(raw: string, envelopeTo: string[], from: string): CaughtMail {
  const split = raw.search(/\r?\n\r?\n/);
  const head = split >= 0 ? raw.slice(0, split) : raw;
  let body = split >= 0 ? raw.slice(split).replace(/^\r?\n\r?\n/, '') : '';
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ');
  const header = (name: string) => new RegExp(`^${name}:\\s*(.*)$`, 'im').exec(unfolded)?.[1]?.trim() ?? '';
  const encoding = header('Content-Transfer-Encoding').toLowerCase();
  if (encoding === 'quoted-printable') body = decodeQuotedPrintable(body);
  if (encoding === 'base64') body = Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8');
  return { from, to: envelopeTo, subject: header('Subject'), text: body, raw, receivedAt: new Date() };
}

/**
 * A local SMTP server for development and tests: it accepts every message on
 * loopback, keeps it in memory and writes it as an .eml file, so invites can
 * be followed without a real mail relay.
 */
export async function startMailCatcher(dir?: string): Promise<{ port: number; messages: CaughtMail[]; close(): Promise<void> }> {
  const messages: CaughtMail[] = [];
  if (dir) mkdirSync(dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        const raw = Buffer.concat(chunks).toString('utf8');
        const to = session.envelope.rcptTo.map((r) => r.address);
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
        const mail = parse(raw, to, from);
        messages.push(mail);
        if (dir) {
          const name = `${mail.receivedAt.toISOString().replace(/[:.]/g, '-')}-${messages.length}.eml`;
          try {
            writeFileSync(join(dir, name), raw);
          } catch {
            // The in-memory copy is enough for the running process.
          }
        }
        callback();
      });
    },
  });
  const port = await new Promise<number>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve((server.server.address() as { port: number }).port));
  });
  return { port, messages, close: () => new Promise<void>((r) => server.close(() => r())) };
}
