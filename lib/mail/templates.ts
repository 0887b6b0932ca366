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

/** An administrator made the account: the person sets their own password through a single-use link. */
export function welcomeMail(o: { to: string; name: string; roleLabel: string; admin: string; link: string; token: string; expiresOn: string }): MailMessage {
  const message = compose(
    "welcome",
    o.to,
    "Your account is ready: set your password",
    [
      `${o.name}, ${o.admin} made you a Delta Ledger account (${o.roleLabel}) for ${o.to}.`,
      `Choose your password through the link below. It works once and expires on ${o.expiresOn}; after that, ask your administrator for a new one.`,
    ],
    { href: o.link, label: "Set your password" },
  );
  return { ...message, secret: o.token };
}

/** An administrator asked for a reset: a single-use link, short-lived, that ends every session of the account when used. */
export function passwordResetMail(o: { to: string; name: string; admin: string; link: string; token: string; expiresAt: string }): MailMessage {
  const message = compose(
    "password-reset",
    o.to,
    "Reset your password",
    [
      `${o.name}, ${o.admin} sent you a link to choose a new Delta Ledger password.`,
      `It works once and expires at ${o.expiresAt} UTC. Setting a new password signs you out everywhere else.`,
      "If you did not ask for this, you can ignore this message: your password stays as it is.",
    ],
    { href: o.link, label: "Choose a new password" },
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

/** A submission taken back before the grants office acted: the officers hear of it, with the reason (the same kind as a submission, so one setting covers both). */
export function withdrawnMail(o: { to: string; investigator: string; scenario: string; studyCode: string; reason: string; link: string }): MailMessage {
  return compose("submitted", o.to, `${o.studyCode}: ${o.scenario} withdrawn from review`, [`${o.investigator} withdrew the scenario "${o.scenario}" of ${o.studyCode} from review.`, `Reason: ${o.reason}`], {
    href: o.link,
    label: "Open the scenario",
  });
}

export function reviewedMail(o: { to: string; scenario: string; studyCode: string; outcome: "returned" | "cleared"; reason: string | null; reviewer: string; link: string }): MailMessage {
  const lines =
    o.outcome === "returned"
      ? [`${o.reviewer} returned the scenario "${o.scenario}" of ${o.studyCode}.`, `Reason: ${o.reason ?? ""}`]
      : [`${o.reviewer} cleared the scenario "${o.scenario}" of ${o.studyCode}. It is now frozen; clone it to make changes.`];
  return compose(o.outcome, o.to, `${o.studyCode}: ${o.scenario} ${o.outcome}`, lines, { href: o.link, label: "Open the scenario" });
}

/** To finance: a scenario is cleared and its workbook can be downloaded. */
export function clearedForFinanceMail(o: { to: string; scenario: string; studyCode: string; total: string; edition: string; reviewer: string; link: string }): MailMessage {
  return compose(
    "cleared",
    o.to,
    `${o.studyCode}: ${o.scenario} cleared`,
    [`${o.reviewer} cleared the scenario "${o.scenario}" of ${o.studyCode}: total ${o.total}, rate book ${o.edition}.`, "Its budget workbook can be downloaded from the scenario's page."],
    { href: o.link, label: "Open the scenario and its workbook" },
  );
}

/**
 * Links that redeem something (an invitation, a password link), found in a stored body whose secret
 * was not withheld (messages written before the outbox withheld secrets): the outbox page shows them
 * redacted all the same.
 */
const REDEEMABLE = /(\/(?:invitations|password)\/)([A-Za-z0-9_-]{16,})/g;

export function redactLinks(text: string): string {
  return text.replace(REDEEMABLE, `$1${SECRET_WITHHELD}`);
}

/** The links in a message's text, for the outbox page; a link whose secret is withheld is left out. */
export function linksIn(text: string): string[] {
  return [...text.matchAll(/https?:\/\/[^\s<>"]+/g)].map((m) => m[0]).filter((l) => !l.includes(SECRET_WITHHELD));
}
