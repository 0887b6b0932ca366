import { redirect } from "next/navigation";
import { homeFor } from "@/lib/auth/home";
import { currentUser } from "@/lib/server/current-user";

export default async function Home() {
  const user = await currentUser();
  redirect(user ? homeFor(user.role) : "/sign-in");
}
