import type { Metadata } from "next";
import Link from "next/link";
import { AcceptInvitationForm } from "@/components/accept-invitation-form";
import { Wordmark } from "@/components/wordmark";
import { lookupInvitation } from "@/db/queries/invitations";

export const metadata: Metadata = { title: "Invitation" };

const WHY = { used: "This invitation has already been used.", expired: "This invitation has expired; ask the investigator for a new one.", revoked: "This invitation was withdrawn.", unknown: "This invitation link is not valid." };

export default async function InvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const inv = await lookupInvitation(token);
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-5 py-10">
      <span className="text-ledger-dark">
        <Wordmark size="lg" />
      </span>
      <section className="card flex flex-col gap-3">
        <h1>Invitation</h1>
        {inv.status === "valid" ? (
          <>
            <p>
              You are invited to join <strong>{inv.studyCode}</strong>, “{inv.studyTitle}”, as a co-investigator ({inv.email}).
            </p>
            <AcceptInvitationForm token={token} newAccount={!inv.hasAccount} />
          </>
        ) : (
          <>
            <p className="alert">{WHY[inv.status]}</p>
            <Link href="/sign-in">Go to sign in</Link>
          </>
        )}
      </section>
    </main>
  );
}
