import Link from "next/link";
import type { ReactNode } from "react";
import { signOutAction } from "@/app/(workspace)/actions";
import type { SessionUser } from "@/db/queries/sessions";
import { navigationFor } from "@/lib/auth/permissions";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { NavLinks } from "./nav-links";
import { Wordmark } from "./wordmark";

export function AppShell({ user, children }: { user: SessionUser; children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:p-2">
        Skip to content
      </a>
      <header className="border-b border-rule bg-ledger-dark text-white print:hidden">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
          <Link href="/" className="text-white hover:text-white" aria-label="Delta Ledger home">
            <Wordmark />
          </Link>
          <NavLinks items={navigationFor(user.role)} />
          <div className="ml-auto flex flex-wrap items-center gap-x-3 gap-y-2 text-sm">
            <span data-testid="whoami">
              <span className="font-medium">{user.name}</span>
              <span className="ml-2 whitespace-nowrap rounded-full bg-white/15 px-2 py-0.5 text-xs" data-testid="role-badge">{ROLE_LABELS[user.role]}</span>
            </span>
            <Link href="/account" className="whitespace-nowrap text-white underline-offset-2 hover:text-white hover:underline">
              Account settings
            </Link>
            <form action={signOutAction}>
              <button type="submit" className="whitespace-nowrap rounded border border-white/40 px-3 py-1 text-white hover:bg-white/10">
                Sign out
              </button>
            </form>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-6xl flex-1 px-4 py-6 print:max-w-none print:p-0">
        {children}
      </main>
      <footer className="border-t border-rule py-4 text-center text-xs text-ink-soft print:hidden">
        Delta Ledger supports, and does not replace, review by a statistician and by your grants office.
      </footer>
    </div>
  );
}
