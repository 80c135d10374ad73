/**
 * Outgoing mail through nodemailer over SMTP.
 *
 * With LINGER_SMTP_URL set, mail goes to that server. Without it, a local fake
 * SMTP server (smtp-server, 127.0.0.1, a free port, no auth, no TLS) starts with
 * the app; nodemailer sends to it over real SMTP and every message it receives
 * is parsed and kept in the `outbox` table, which the admin page and the tests
 * read.
 */
import nodemailer from "nodemailer";
import { SMTPServer } from "smtp-server";
import type { AddressInfo } from "node:net";
import type { Db } from "@/db/client";
import { schema } from "@/db/client";
import type { Env } from "@/server/env";

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
}
export interface Mailer {
  send(message: MailMessage): Promise<void>;
  close(): Promise<void>;
  /** "fake": messages land in the outbox table; "smtp": a real server; "null": dropped. */
  readonly kind?: "fake" | "smtp" | "null";
}

const pending = new WeakMap<Mailer, Set<Promise<void>>>();

/**
 * Hands a message to the mailer without making the request wait for it, so an answer takes the same time
 * whether or not a mail goes out (no account enumeration by timing). A failure is logged, never thrown.
 */
export function queueMail(mailer: Mailer, message: MailMessage): void {
  let set = pending.get(mailer);
  if (!set) pending.set(mailer, (set = new Set()));
  const p: Promise<void> = mailer
    .send(message)
    .catch((e: unknown) => console.error(`[mail] sending "${message.subject}" failed:`, (e as Error).message))
    .finally(() => set.delete(p));
  set.add(p);
}

/** Resolves once every queued message of this mailer has been handed over (shutdown; tests reading the outbox). */
export async function mailSettled(mailer: Mailer): Promise<void> {
  const set = pending.get(mailer);
  while (set && set.size > 0) await Promise.allSettled([...set]);
}

/** A mailer that drops mail (used only where no mail is wanted, e.g. benchmarks). */
export const nullMailer: Mailer = { kind: "null", send: async () => {}, close: async () => {} };

/**
 * The mailer for this configuration: SMTP to LINGER_SMTP_URL, or the local
 * fake server writing to the outbox table of `deps.db`.
 */
export async function createMailer(
  env: Pick<Env, "LINGER_SMTP_URL" | "LINGER_MAIL_FROM">,
  deps: { db: Db },
): Promise<Mailer> {
  if (env.LINGER_SMTP_URL) {
    const transport = nodemailer.createTransport(env.LINGER_SMTP_URL);
    return {
      kind: "smtp",
      async send(m) {
        await transport.sendMail({ from: env.LINGER_MAIL_FROM, to: m.to, subject: m.subject, text: m.text });
      },
      async close() {
        transport.close();
      },
    };
  }
  const fake = await startFakeSmtpServer(deps.db);
  const transport = nodemailer.createTransport({ host: "127.0.0.1", port: fake.port, secure: false, ignoreTLS: true });
  return {
    kind: "fake",
    async send(m) {
      await transport.sendMail({ from: env.LINGER_MAIL_FROM, to: m.to, subject: m.subject, text: m.text });
    },
    async close() {
      transport.close();
      await fake.close();
    },
  };
}

export interface FakeSmtpServer {
  port: number;
  close(): Promise<void>;
}

/** A local SMTP server that stores every received message in the outbox table. */
export function startFakeSmtpServer(db: Db): Promise<FakeSmtpServer> {
  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    hideSTARTTLS: true,
    logger: false,
    banner: "Linger local outbox",
    size: 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", callback);
      stream.on("end", () => {
        try {
          const parsed = parseMailMessage(Buffer.concat(chunks).toString("utf8"));
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(", ");
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
          db.insert(schema.outbox)
            .values({
              to: parsed.to || envelopeTo,
              from: parsed.from || envelopeFrom,
              subject: parsed.subject,
              text: parsed.text,
              receivedAt: new Date(),
            })
            .run();
          callback();
        } catch (e) {
          callback(e as Error);
        }
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const port = ((server as any).server.address() as AddressInfo).port;
      server.on("error", (e) => console.error("[mail] fake SMTP server:", e));
      resolve({
        port,
        close: () => new Promise<void>((r) => server.close(() => r())),
      });
    });
  });
}

// ------------------------------------------------------------ message parsing

export interface ParsedMail {
  from: string;
  to: string;
  subject: string;
  text: string;
}

/**
 * Parses the plain messages this app sends (RFC 5322 headers, RFC 2047 encoded
 * words, a text/plain body in 7bit/8bit, quoted-printable or base64; for a
 * multipart message the first text/plain part). Not a general MIME parser.
 */
export function parseMailMessage(raw: string): ParsedMail {
  const { headers, body } = splitHeaders(raw);
  const contentType = headers.get("content-type") ?? "text/plain";
  let text: string;
  const boundary = /boundary="?([^";]+)"?/i.exec(contentType)?.[1];
  if (/^multipart\//i.test(contentType) && boundary) {
    text = "";
    for (const part of body.split(`--${boundary}`).slice(1)) {
      if (part.startsWith("--")) break;
      const p = splitHeaders(part.replace(/^\r?\n/, ""));
      const pType = p.headers.get("content-type") ?? "text/plain";
      if (/^text\/plain/i.test(pType)) {
        text = decodeBody(p.body, p.headers.get("content-transfer-encoding"), pType);
        break;
      }
    }
  } else {
    text = decodeBody(body, headers.get("content-transfer-encoding"), contentType);
  }
  return {
    from: decodeWords(headers.get("from") ?? ""),
    to: decodeWords(headers.get("to") ?? ""),
    subject: decodeWords(headers.get("subject") ?? ""),
    text: text.replace(/\r\n/g, "\n").replace(/\n+$/, ""),
  };
}

function splitHeaders(raw: string): { headers: Map<string, string>; body: string } {
  const m = /\r?\n\r?\n/.exec(raw);
  const head = m ? raw.slice(0, m.index) : raw;
  const body = m ? raw.slice(m.index + m[0].length) : "";
  const headers = new Map<string, string>();
  // Unfold continuation lines, then split "Name: value".
  for (const line of head.replace(/\r?\n[ \t]+/g, " ").split(/\r?\n/)) {
    const i = line.indexOf(":");
    if (i <= 0) continue;
    const name = line.slice(0, i).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(i + 1).trim());
  }
  return { headers, body };
}

function charsetOf(contentType: string): BufferEncoding {
  const cs = /charset="?([^";]+)"?/i.exec(contentType)?.[1]?.toLowerCase() ?? "utf-8";
  return cs === "us-ascii" || cs === "ascii" ? "ascii" : cs === "iso-8859-1" || cs === "latin1" ? "latin1" : "utf8";
}

function decodeBody(body: string, encoding: string | undefined, contentType: string): string {
  const enc = (encoding ?? "7bit").toLowerCase();
  const charset = charsetOf(contentType);
  if (enc === "base64") return Buffer.from(body.replace(/\s+/g, ""), "base64").toString(charset);
  if (enc === "quoted-printable") return decodeQuotedPrintable(body, charset);
  return body;
}

function decodeQuotedPrintable(s: string, charset: BufferEncoding): string {
  const soft = s.replace(/=\r?\n/g, "");
  const bytes: number[] = [];
  for (let i = 0; i < soft.length; i++) {
    const c = soft[i];
    if (c === "=" && /^[0-9A-Fa-f]{2}$/.test(soft.slice(i + 1, i + 3))) {
      bytes.push(parseInt(soft.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      for (const b of Buffer.from(c, "utf8")) bytes.push(b);
    }
  }
  return Buffer.from(bytes).toString(charset);
}

/** RFC 2047 encoded words (=?charset?B|Q?...?=); whitespace between adjacent words is dropped. */
function decodeWords(s: string): string {
  return s
    .replace(/(\?=)\s+(=\?)/g, "$1$2")
    .replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_all, charset: string, kind: string, data: string) => {
      const cs = charsetOf(`charset=${charset}`);
      if (kind.toUpperCase() === "B") return Buffer.from(data, "base64").toString(cs);
      return decodeQuotedPrintable(data.replace(/_/g, " "), cs);
    });
}
