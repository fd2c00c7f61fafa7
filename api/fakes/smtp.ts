/**
 * A local mail capture server for development and tests: it speaks SMTP on loopback (no
 * AUTH, no STARTTLS), accepts every message, parses it with mailparser as it arrives and keeps
 * the raw RFC 5322 source next to the parsed fields — in memory and, when `dir` is given, as
 * `.eml` files (development: `.data/outbox/`), read back on the next start. The development
 * outbox page shows what it holds.
 *
 * `close()` stops listening and `restart()` listens again on the same port, so tests can
 * simulate a mail server outage; captured messages survive both.
 */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { simpleParser, type AddressObject, type ParsedMail } from 'mailparser';
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from 'smtp-server';

export interface CapturedMessage {
  /** Stable and path-safe: also the `.eml` file name. */
  id: string;
  receivedAt: Date;
  /** What the client said in MAIL FROM and RCPT TO (empty for messages read back from files). */
  envelope: { from: string | null; to: string[] };
  /** The message exactly as received (RFC 5322 source). */
  raw: string;
  from: string;
  to: string;
  subject: string;
  date: Date | null;
  messageId: string | null;
  /** Header fields in their order, unfolded, as written by the sender. */
  headers: { name: string; value: string }[];
  text: string;
  html: string | null;
}

export interface Outbox {
  /** `smtp://127.0.0.1:<port>` — what the mailer connects to. */
  url: string;
  port: number;
  /** Newest first. */
  messages(): CapturedMessage[];
  message(id: string): CapturedMessage | undefined;
  /** Stop listening (captured messages are kept). */
  close(): Promise<void>;
  /** Listen again on the same port after `close()`. */
  restart(): Promise<void>;
}

export interface FakeSmtpOptions {
  /** 0 picks a free port; `restart()` reuses whichever port was bound first. */
  port: number;
  host?: string;
  /** Also keep every message as `<id>.eml` here, and read the newest back on start. */
  dir?: string;
  /** Largest message accepted, in bytes (default 10 MiB). */
  maxBytes?: number;
  /** How many messages are kept in memory and read back from `dir` (default 500). */
  keep?: number;
}

const ID_RE = /^[0-9]{8}T[0-9]{9}-[0-9a-f]{8}$/;

function newId(at: Date): string {
  const stamp = at.toISOString().replace(/[-:.Z]/g, '');
  return `${stamp}-${randomBytes(4).toString('hex')}`;
}

const addressText = (value: AddressObject | AddressObject[] | undefined): string =>
  value === undefined ? '' : (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ');

function capture(
  id: string,
  receivedAt: Date,
  raw: string,
  parsed: ParsedMail,
  envelope: CapturedMessage['envelope'],
): CapturedMessage {
  return {
    id,
    receivedAt,
    envelope,
    raw,
    from: addressText(parsed.from),
    to: addressText(parsed.to),
    subject: parsed.subject ?? '',
    date: parsed.date ?? null,
    messageId: parsed.messageId ?? null,
    headers: parsed.headerLines.map(({ line }) => {
      const unfolded = line.replace(/\r?\n[ \t]+/g, ' ');
      const colon = unfolded.indexOf(':');
      return { name: unfolded.slice(0, colon).trim(), value: unfolded.slice(colon + 1).trim() };
    }),
    text: parsed.text ?? '',
    html: typeof parsed.html === 'string' ? parsed.html : null,
  };
}

async function readBack(dir: string, keep: number): Promise<CapturedMessage[]> {
  if (!fs.existsSync(dir)) return [];
  const files = fs
    .readdirSync(dir)
    .filter((f) => f.endsWith('.eml') && ID_RE.test(f.slice(0, -4)))
    .sort()
    .slice(-keep);
  const found: CapturedMessage[] = [];
  for (const file of files) {
    const full = path.join(dir, file);
    const raw = fs.readFileSync(full, 'utf8');
    const parsed = await simpleParser(raw);
    const to = addressText(parsed.to);
    found.push(capture(file.slice(0, -4), fs.statSync(full).mtime, raw, parsed, { from: null, to: to ? [to] : [] }));
  }
  return found.reverse();
}

export async function startFakeSmtp(options: FakeSmtpOptions): Promise<Outbox> {
  const host = options.host ?? '127.0.0.1';
  const maxBytes = options.maxBytes ?? 10 * 1024 * 1024;
  const keep = options.keep ?? 500;
  const messages: CapturedMessage[] = options.dir ? await readBack(options.dir, keep) : [];
  if (options.dir) fs.mkdirSync(options.dir, { recursive: true });

  async function receive(stream: SMTPServerDataStream, session: SMTPServerSession): Promise<string> {
    const chunks: Buffer[] = [];
    for await (const chunk of stream) chunks.push(chunk as Buffer);
    if (stream.sizeExceeded) {
      throw Object.assign(new Error(`Message exceeds the ${maxBytes}-byte limit of the local mail capture.`), {
        responseCode: 552,
      });
    }
    const raw = Buffer.concat(chunks).toString('utf8');
    const receivedAt = new Date();
    const id = newId(receivedAt);
    const parsed = await simpleParser(raw);
    const mailFrom = session.envelope.mailFrom;
    const message = capture(id, receivedAt, raw, parsed, {
      from: mailFrom ? mailFrom.address : null,
      to: session.envelope.rcptTo.map((r) => r.address),
    });
    if (options.dir) await fs.promises.writeFile(path.join(options.dir, `${id}.eml`), raw);
    messages.unshift(message);
    messages.length = Math.min(messages.length, keep);
    return id;
  }

  function createServer() {
    return new SMTPServer({
      name: 'localhost',
      banner: 'Reworkbook local mail capture',
      disabledCommands: ['AUTH', 'STARTTLS'],
      authOptional: true,
      size: maxBytes,
      logger: false,
      // Tests stop the server mid-run: do not wait half a minute for idle clients.
      closeTimeout: 1_000,
      onData(stream, session, callback) {
        receive(stream, session).then(
          (id) => callback(null, `Queued as ${id}`),
          (error: Error) => callback(error),
        );
      },
    });
  }

  let server: SMTPServer | null = null;
  let port = options.port;

  async function listen() {
    const next = createServer();
    await new Promise<void>((resolve, reject) => {
      const onError = (error: Error) => reject(error);
      next.once('error', onError);
      next.listen(port, host, () => {
        next.off('error', onError);
        resolve();
      });
    });
    // A client that drops mid-session must not bring the process down.
    next.on('error', () => {});
    port = (next.server.address() as AddressInfo).port;
    server = next;
  }

  await listen();
  const url = `smtp://${host}:${port}`;

  return {
    url,
    port,
    messages: () => [...messages],
    message: (id) => messages.find((m) => m.id === id),
    async close() {
      const current = server;
      server = null;
      if (current) await new Promise<void>((resolve) => current.close(() => resolve()));
    },
    async restart() {
      if (server) return;
      await listen();
    },
  };
}
