import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/sign-in-form";
import { Wordmark } from "@/components/wordmark";
import { homeFor } from "@/lib/auth/home";
import { currentUser } from "@/lib/server/current-user";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage() {
  const user = await currentUser();
  if (user) redirect(homeFor(user.role));
  return (
    <main className="mx-auto flex min-h-screen max-w-5xl flex-col items-stretch justify-center gap-10 px-5 py-10 md:flex-row md:items-center">
      <section className="text-ledger-dark md:flex-1">
        <Wordmark size="lg" />
        <p className="mt-4 max-w-md text-lg text-ink">
          Size the study and cost it in one place: see what each budget can detect, weigh costed scenarios against the sponsor&apos;s cap,
          and hand the grants office a budget that reconciles.
        </p>
      </section>
      <section className="card w-full md:max-w-sm" aria-labelledby="sign-in-heading">
        <h1 id="sign-in-heading" className="mb-4">
          Sign in
        </h1>
        <SignInForm />
      </section>
    </main>
  );
}
