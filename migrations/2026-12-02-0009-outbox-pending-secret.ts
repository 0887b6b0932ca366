import { sql, type Kysely } from "kysely";

/**
 * The outbox keeps no redeemable invitation link at rest: a message's bodies hold the link with its
 * token withheld, and the token waits in `secret` only until the message is delivered. Stored
 * invitations are rewritten the same way (their tokens kept only where still undelivered).
 */
const WITHHELD = "[withheld]";
const LINK = /(\/invitations\/)([A-Za-z0-9_-]{16,})/g;

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable("outbox").addColumn("secret", "text").execute();
  const rows = (await db.selectFrom("outbox").select(["id", "text_body", "html_body", "sent_at"]).where("kind", "=", "invitation").execute()) as {
    id: number;
    text_body: string;
    html_body: string;
    sent_at: string | null;
  }[];
  for (const r of rows) {
    const token = [...r.text_body.matchAll(LINK)][0]?.[2];
    if (!token) continue;
    await db
      .updateTable("outbox")
      .set({ text_body: r.text_body.split(token).join(WITHHELD), html_body: r.html_body.split(token).join(WITHHELD), secret: r.sent_at ? null : token })
      .where("id", "=", r.id)
      .execute();
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`update outbox set text_body = replace(text_body, ${WITHHELD}, secret), html_body = replace(html_body, ${WITHHELD}, secret) where secret is not null`.execute(db);
  await db.schema.alterTable("outbox").dropColumn("secret").execute();
}
