import type { Metadata } from "next";
import { AccountRowControls, CreateAccountForm } from "@/components/account-forms";
import { listAccounts } from "@/db/queries/accounts";
import { can } from "@/lib/auth/permissions";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { requireUser } from "@/lib/server/current-user";
import { TableHead } from "@/components/table-head";
import { ScrollRegion } from "@/components/scroll-region";

export const metadata: Metadata = { title: "Accounts" };

export default async function AccountsPage() {
  const user = await requireUser();
  if (!can(user, "accounts.manage")) {
    return (
      <div className="card max-w-xl">
        <h1>Accounts</h1>
        <p className="mt-2">Only administrators manage accounts.</p>
      </div>
    );
  }
  const accounts = await listAccounts(user);
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1>Accounts</h1>
        <p className="text-ink-soft">Who can sign in, and in which role. Changes take effect on the person&apos;s next request.</p>
      </div>
      <ScrollRegion className="card p-0" label="Accounts">
        <table className="table">
          <TableHead columns={["Name", "E-mail", "Role", "Status", "Change"]} />
          <tbody>
            {accounts.map((a) => (
              <tr key={a.id}>
                <td className="font-medium">{a.name}</td>
                <td>{a.email}</td>
                <td>{ROLE_LABELS[a.role]}</td>
                <td>
                  <span className={a.active ? "badge" : "badge badge-muted"}>{a.active ? "Active" : "Deactivated"}</span>
                  {a.passwordSet ? null : (
                    <span className="ml-2 text-sm text-ink-soft" data-testid={`no-password-${a.id}`}>
                      no password yet
                    </span>
                  )}
                </td>
                <td>
                  <AccountRowControls userId={a.id} name={a.name} role={a.role} active={a.active} self={a.id === user.id} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollRegion>
      <section className="card" aria-labelledby="new-account">
        <h2 id="new-account" className="mb-3">
          New account
        </h2>
        <CreateAccountForm />
      </section>
    </div>
  );
}
