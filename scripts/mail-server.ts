/**
 * The local SMTP server for development, the demo and the tests (the smtp-server package): it
 * accepts every message on a loopback port and stores it as JSON in MAILBOX_DIR, once per Message-ID.
 */
import { createHash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";

export type StoredMail = { messageId: string; from: string; to: string[]; subject: string; text: string; html: string; receivedAt: string };

export function defaultMailboxDir(): string {
  return process.env.MAILBOX_DIR ?? path.join(process.cwd(), "data", "mailbox");
}

export function readMailbox(dir = defaultMailboxDir()): StoredMail[] {
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith(".json"))
    .map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), "utf8")) as StoredMail)
    .sort((a, b) => a.receivedAt.localeCompare(b.receivedAt));
}

export async function startMailServer(opts: { port?: number; dir?: string } = {}): Promise<{ port: number; dir: string; close: () => Promise<void> }> {
  const dir = opts.dir ?? defaultMailboxDir();
  fs.mkdirSync(dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    size: 5 * 1024 * 1024,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const messageId = mail.messageId ?? `<no-id-${Date.now()}-${Math.random()}>`;
          const file = path.join(dir, `${createHash("sha256").update(messageId).digest("hex").slice(0, 32)}.json`);
          // The same Message-ID twice is one message: a sender that retries after a crash cannot duplicate it.
          if (!fs.existsSync(file)) {
            const stored: StoredMail = {
              messageId,
              from: mail.from?.text ?? "",
              to: session.envelope.rcptTo.map((r) => r.address),
              subject: mail.subject ?? "",
              text: mail.text ?? "",
              html: typeof mail.html === "string" ? mail.html : "",
              receivedAt: new Date().toISOString(),
            };
            fs.writeFileSync(file, JSON.stringify(stored, null, 2));
          }
          callback();
        })
        .catch((err) => callback(err as Error));
    },
  });
  const port = await new Promise<number>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port ?? 2525, "127.0.0.1", () => resolve((server.server.address() as { port: number }).port));
  });
  return { port, dir, close: () => new Promise((resolve) => server.close(() => resolve())) };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  startMailServer({ port: Number(process.env.SMTP_PORT ?? 2525) })
    .then(({ port, dir }) => console.log(`local mail server on 127.0.0.1:${port}, storing messages in ${dir}`))
    .catch((err) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    });
}
