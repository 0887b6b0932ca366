import { AppShell } from "@/components/app-shell";
import { requireUser } from "@/lib/server/current-user";

export default async function WorkspaceLayout({ children }: { children: React.ReactNode }) {
  const user = await requireUser();
  return <AppShell user={user}>{children}</AppShell>;
}
