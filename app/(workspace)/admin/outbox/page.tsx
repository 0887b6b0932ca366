import type { Metadata } from "next";
import { listOutbox } from "@/db/queries/outbox";
import { can } from "@/lib/auth/permissions";
import { requireUser } from "@/lib/server/current-user";
import { smtpSettings } from "@/lib/mail/transport";
import Link from "next/link";

export const metadata: Metadata = { title: "Outbox" };

export default async function OutboxPage() {
  const user = await requireUser();
  if (!can(user, "outbox.view")) {
    return (
      <div className="card max-w-xl">
        <h1>Outbox</h1>
        <p className="mt-2">Only administrators see the outbox.</p>
      </div>
    );
  }
  const rows = await listOutbox(user);
  // Where mail goes is set where the server is installed; the page shows it (never the password) and who chooses what.
  const smtp = smtpSettings();
  return (
    <div className="flex flex-col gap-5">
      <div>
        <h1>Outbox</h1>
        <p className="text-ink-soft">Every message Delta Ledger has written, newest first, with its delivery state. In development and the demo they go to the local mail server. Invitation, welcome and password-reset links show as [withheld]: only the recipient's own e-mail carries a working link.</p>
      </div>
      <section className="card text-sm" aria-labelledby="mail-settings" data-testid="mail-settings">
        <h2 id="mail-settings" className="text-base">Mail settings</h2>
        <p className="mt-1">
          Messages are sent from <span className="font-medium">{smtp.from}</span> through the mail server at <span className="num">{smtp.host}:{smtp.port}</span>
          {smtp.secure ? " over TLS" : ""}. The server and the sender are set where Delta Ledger is installed (its SMTP and MAIL_FROM environment settings), not on a page.
        </p>
        <p className="mt-1">
          Each person chooses which notification e-mails they receive in their own <Link href="/account">Account settings</Link>; invitations, welcome messages and password resets always go.
        </p>
      </section>
      {rows.length === 0 ? <p className="card">No messages yet.</p> : null}
      <ul className="flex flex-col gap-3" data-testid="outbox">
        {rows.map((m) => (
          <li key={m.id} className="card">
            <div className="flex flex-wrap items-baseline gap-2">
              <span className="font-medium">{m.subject}</span>
              <span className={m.sentAt ? "badge" : "badge badge-muted"}>{m.sentAt ? "delivered" : m.attempts ? `waiting (${m.attempts} attempts)` : "queued"}</span>
            </div>
            <p className="text-sm text-ink-soft">
              To {m.to} · written {m.createdAt.replace("T", " ").slice(0, 19)} UTC{m.sentAt ? ` · delivered ${m.sentAt.replace("T", " ").slice(0, 19)} UTC` : ""}
              {m.lastError ? ` · last error: ${m.lastError}` : ""}
            </p>
            <details className="mt-2">
              <summary className="cursor-pointer text-sm">Text and links</summary>
              <pre className="mt-2 whitespace-pre-wrap text-sm [overflow-wrap:anywhere]">{m.text}</pre>
              <ul className="mt-1 text-sm [overflow-wrap:anywhere]">
                {m.links.map((l) => (
                  <li key={l}>
                    <a href={l}>{l}</a>
                  </li>
                ))}
              </ul>
            </details>
          </li>
        ))}
      </ul>
    </div>
  );
}
