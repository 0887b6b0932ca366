import type { Metadata } from "next";
import Link from "next/link";
import { SetPasswordForm } from "@/components/set-password-form";
import { Wordmark } from "@/components/wordmark";
import { lookupPasswordLink, PASSWORD_LINK_REFUSALS } from "@/db/queries/passwords";

export const metadata: Metadata = { title: "Choose a password" };

export default async function SetPasswordPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const link = await lookupPasswordLink(token);
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-5 py-10">
      <span className="text-ledger-dark">
        <Wordmark size="lg" />
      </span>
      <section className="card flex flex-col gap-3">
        <h1>{link.status === "valid" && link.purpose === "welcome" ? "Welcome: choose your password" : "Choose a new password"}</h1>
        {link.status === "valid" ? (
          <>
            <p>
              For {link.name} ({link.email}). The link works once; setting the password signs you in here and out everywhere else.
            </p>
            <SetPasswordForm token={token} />
          </>
        ) : (
          <>
            <p className="alert">{PASSWORD_LINK_REFUSALS[link.status]}</p>
            <Link href="/sign-in">Go to sign in</Link>
          </>
        )}
      </section>
    </main>
  );
}
