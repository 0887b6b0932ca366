import { describe, expect, it } from "vitest";
import { mailKindsFor, OPTIONAL_MAIL_KINDS } from "@/lib/mail/settings";
import { clearedForFinanceMail, linksIn, passwordResetMail, redactLinks, welcomeMail, withholdSecret } from "@/lib/mail/templates";

const TOKEN = "Zk3nQ9-vX1_abcdefghijklmnopqrstuvwxyz0123";

describe("password e-mails keep their secret out of what is stored", () => {
  it("welcome and reset bodies, as stored, hold the link withheld in text and HTML", () => {
    for (const m of [
      welcomeMail({ to: "a@demo.test", name: "A", roleLabel: "Finance", admin: "Admin", link: `http://x/password/${TOKEN}`, token: TOKEN, expiresOn: "2027-01-08" }),
      passwordResetMail({ to: "a@demo.test", name: "A", admin: "Admin", link: `http://x/password/${TOKEN}`, token: TOKEN, expiresAt: "2027-01-02 10:00" }),
    ]) {
      expect(m.text).toContain(TOKEN);
      const stored = withholdSecret(m);
      expect(stored.text + stored.html).not.toContain(TOKEN);
      expect(stored.text).toContain("http://x/password/[withheld]");
      expect(linksIn(stored.text)).toEqual([]);
    }
  });

  it("the outbox view redacts a redeemable link written before secrets were withheld, and leaves other links", () => {
    const text = `Join: http://x/invitations/${TOKEN}\nSet: http://x/password/${TOKEN}\nOpen: http://x/studies/1/scenarios/2`;
    expect(redactLinks(text)).toBe("Join: http://x/invitations/[withheld]\nSet: http://x/password/[withheld]\nOpen: http://x/studies/1/scenarios/2");
    expect(linksIn(redactLinks(text))).toEqual(["http://x/studies/1/scenarios/2"]);
  });

  it("finance's clearance e-mail names the total and edition and links to the scenario", () => {
    const m = clearedForFinanceMail({ to: "f@demo.test", scenario: "Six sites", studyCode: "WALK-KNEE", total: "$74,807.00", edition: "2027 rates", reviewer: "G", link: "http://x/studies/1/scenarios/2" });
    expect(m.kind).toBe("cleared");
    expect(m.text).toContain("total $74,807.00, rate book 2027 rates");
    expect(linksIn(m.text)).toEqual(["http://x/studies/1/scenarios/2"]);
  });
});

describe("e-mail settings offer each role only the kinds it receives", () => {
  it("by role", () => {
    expect(mailKindsFor("admin")).toEqual([]);
    expect(mailKindsFor("grants-officer").map((k) => k.kind)).toEqual(["submitted", "comment-reply"]);
    expect(mailKindsFor("finance").map((k) => k.kind)).toEqual(["cleared"]);
    expect(mailKindsFor("co-investigator").map((k) => k.kind)).toEqual(["returned", "cleared", "comment-reply"]);
    expect(mailKindsFor("investigator").map((k) => k.kind)).toEqual(["returned", "cleared", "comment", "comment-reply"]);
  });
  it("no message a person needs to act on can be turned off", () => {
    const kinds = OPTIONAL_MAIL_KINDS.map((k) => k.kind as string);
    for (const needed of ["invitation", "welcome", "password-reset"]) expect(kinds).not.toContain(needed);
  });
});
