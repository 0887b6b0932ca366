"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { inviteSchema } from "@/lib/planning/comment-schemas";

type Member = { userId: number; name: string; email: string; studyRole: "investigator" | "co-investigator" };
type Pending = { id: number; email: string; expiresAt: string };

/** The study's members; for its investigator, invitations to send and revoke, and members to remove. */
export function StudyMembers({ studyId, members, invitations, manage }: { studyId: number; members: Member[]; invitations: Pending[]; manage: boolean }) {
  const router = useRouter();
  const [email, setEmail] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const call = async (url: string, method: string, body?: unknown) => {
    setError(null);
    const res = await fetch(url, { method, headers: body ? { "content-type": "application/json" } : undefined, body: body ? JSON.stringify(body) : undefined }).catch(() => null);
    const data = await res?.json().catch(() => null);
    if (!res || !res.ok) {
      setError(data?.error?.fields ? Object.values(data.error.fields as Record<string, string[]>).flat().join(" ") : (data?.error?.message ?? "That did not work."));
      return false;
    }
    router.refresh();
    return true;
  };
  return (
    <section className="card flex flex-col gap-3" aria-labelledby="members">
      <h2 id="members">Members</h2>
      <ul className="flex flex-col gap-2">
        {members.map((m) => (
          <li key={m.userId} className="flex flex-wrap items-center gap-2">
            <span>
              <span className="font-medium">{m.name}</span> <span className="badge">{m.studyRole === "investigator" ? "Investigator" : "Co-investigator"}</span>
              <br />
              <span className="text-sm text-ink-soft">{m.email}</span>
            </span>
            {manage && m.studyRole !== "investigator" ? (
              <button type="button" className="ml-auto text-sm text-signal underline" onClick={() => call(`/api/v1/studies/${studyId}/members/${m.userId}`, "DELETE")}>
                Remove
              </button>
            ) : null}
          </li>
        ))}
      </ul>
      {manage ? (
        <>
          {invitations.length ? (
            <div>
              <h3 className="text-sm font-semibold">Pending invitations</h3>
              <ul className="mt-1 flex flex-col gap-1 text-sm" data-testid="pending-invitations">
                {invitations.map((i) => (
                  <li key={i.id} className="flex items-center gap-2">
                    {i.email} <span className="text-xs text-ink-soft">until {i.expiresAt.slice(0, 10)}</span>
                    <button type="button" className="ml-auto text-signal underline" onClick={() => call(`/api/v1/studies/${studyId}/invitations/${i.id}`, "DELETE")}>
                      Revoke
                    </button>
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
          <form
            className="flex flex-col gap-2"
            noValidate
            onSubmit={async (e) => {
              e.preventDefault();
              setNotice(null);
              // The same schema as the server: an empty or malformed address is answered beside the field at once.
              const checked = inviteSchema.safeParse({ email });
              if (!checked.success) {
                setError(checked.error.issues[0]?.message ?? "Enter the e-mail address of the person to invite.");
                return;
              }
              if (await call(`/api/v1/studies/${studyId}/invitations`, "POST", { email: checked.data.email })) {
                setNotice(`Invitation sent to ${checked.data.email}.`);
                setEmail("");
              }
            }}
          >
            <label htmlFor="invite-email" className="text-sm font-medium">
              Invite a co-investigator
            </label>
            <span id="invite-hint" className="text-xs text-ink-soft">
              Their e-mail address; they get a link to join the study.
            </span>
            <div className="flex gap-2">
              <input
                id="invite-email"
                type="email"
                className="input flex-1"
                value={email}
                onChange={(e) => setEmail(e.target.value)}
                placeholder="name@example.org"
                aria-invalid={error ? true : undefined}
                aria-describedby={error ? "invite-hint invite-error" : "invite-hint"}
              />
              <button type="submit" className="btn">
                Invite
              </button>
            </div>
            {error ? (
              <span id="invite-error" className="error text-sm text-signal" role="alert">
                {error}
              </span>
            ) : null}
            {notice ? (
              <span className="text-sm text-ledger" role="status">
                {notice}
              </span>
            ) : null}
          </form>
        </>
      ) : null}
    </section>
  );
}
