/** E-mail messages: plain-text and HTML parts, the product's name, a link to the page. Pure. */
export type MailMessage = { kind: string; to: string; subject: string; text: string; html: string; secret?: string };

/**
 * What the outbox keeps in place of a message's secret (an invitation token): the stored bodies hold
 * no redeemable link, and the secret goes back in only at sending time.
 */
export const SECRET_WITHHELD = "[withheld]";

export function withholdSecret(m: MailMessage): { text: string; html: string } {
  if (!m.secret) return { text: m.text, html: m.html };
  return { text: m.text.split(m.secret).join(SECRET_WITHHELD), html: m.html.split(m.secret).join(SECRET_WITHHELD) };
}

export function restoreSecret(body: string, secret: string | null): string {
  return secret ? body.split(SECRET_WITHHELD).join(secret) : body;
}

const esc = (s: string) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

function compose(kind: string, to: string, subject: string, lines: string[], link: { href: string; label: string }): MailMessage {
  const text = [...lines, "", `${link.label}: ${link.href}`, "", "— Delta Ledger"].join("\n");
  const html = `<div style="font-family:system-ui,sans-serif;color:#1c2430"><p style="font-weight:600;color:#224439">Delta Ledger</p>${lines
    .map((l) => `<p>${esc(l)}</p>`)
    .join("")}<p><a href="${esc(link.href)}">${esc(link.label)}</a></p></div>`;
  return { kind, to, subject: `[Delta Ledger] ${subject}`, text, html };
}

export function invitationMail(o: { to: string; inviter: string; studyCode: string; studyTitle: string; link: string; token: string; expiresOn: string }): MailMessage {
  const message = compose(
    "invitation",
    o.to,
    `Invitation to study ${o.studyCode}`,
    [`${o.inviter} invites you to join the study ${o.studyCode}, "${o.studyTitle}", as a co-investigator.`, `The link works once and expires on ${o.expiresOn}.`],
    { href: o.link, label: "Accept the invitation" },
  );
  return { ...message, secret: o.token };
}

export function commentMail(o: { to: string; author: string; scenario: string; body: string; link: string; reply: boolean }): MailMessage {
  return compose(
    o.reply ? "comment-reply" : "comment",
    o.to,
    o.reply ? `${o.author} replied to your comment on ${o.scenario}` : `${o.author} commented on ${o.scenario}`,
    [`${o.author} wrote:`, o.body.length > 600 ? `${o.body.slice(0, 600)}…` : o.body],
    { href: o.link, label: "Open the scenario" },
  );
}

export function submittedMail(o: { to: string; investigator: string; scenario: string; studyCode: string; link: string }): MailMessage {
  return compose("submitted", o.to, `${o.studyCode}: ${o.scenario} submitted for review`, [`${o.investigator} submitted the scenario "${o.scenario}" of ${o.studyCode} for the grants office's review.`], {
    href: o.link,
    label: "Review the scenario",
  });
}

export function reviewedMail(o: { to: string; scenario: string; studyCode: string; outcome: "returned" | "cleared"; reason: string | null; reviewer: string; link: string }): MailMessage {
  const lines =
    o.outcome === "returned"
      ? [`${o.reviewer} returned the scenario "${o.scenario}" of ${o.studyCode}.`, `Reason: ${o.reason ?? ""}`]
      : [`${o.reviewer} cleared the scenario "${o.scenario}" of ${o.studyCode}. It is now frozen; clone it to make changes.`];
  return compose(o.outcome, o.to, `${o.studyCode}: ${o.scenario} ${o.outcome}`, lines, { href: o.link, label: "Open the scenario" });
}

/** The links in a message's text, for the outbox page; a link whose secret is withheld is left out. */
export function linksIn(text: string): string[] {
  return [...text.matchAll(/https?:\/\/[^\s<>"]+/g)].map((m) => m[0]).filter((l) => !l.includes(SECRET_WITHHELD));
}
