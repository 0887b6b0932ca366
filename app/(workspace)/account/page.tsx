import type { Metadata } from "next";
import { ChangePasswordForm, MailSettingsForm } from "@/components/account-settings";
import { getMailSettings } from "@/db/queries/mail-settings";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { requireUser } from "@/lib/server/current-user";

export const metadata: Metadata = { title: "Account settings" };

export default async function AccountSettingsPage() {
  const user = await requireUser();
  const settings = await getMailSettings(user);
  return (
    <div className="flex max-w-2xl flex-col gap-6">
      <div>
        <h1>Account settings</h1>
        <p className="text-ink-soft">
          {user.name} · {user.email} · {ROLE_LABELS[user.role]}
        </p>
      </div>
      <section className="card" aria-labelledby="password-heading">
        <h2 id="password-heading" className="mb-1">
          Password
        </h2>
        <p className="mb-3 text-sm text-ink-soft">Changing it signs you out on every other browser and device; this one stays signed in.</p>
        <ChangePasswordForm />
      </section>
      <section className="card" aria-labelledby="mail-heading">
        <h2 id="mail-heading" className="mb-1">
          E-mail notifications
        </h2>
        <p className="mb-3 text-sm text-ink-soft">
          Which notifications reach {user.email}. Invitations, welcome messages and password links always do.
        </p>
        {settings.length ? <MailSettingsForm settings={settings.map((s) => ({ kind: s.kind, label: s.label, on: s.on }))} /> : <p>Your role receives no notifications.</p>}
      </section>
    </div>
  );
}
