import "server-only";
import { notFound } from "next/navigation";
import { HttpError } from "@/lib/auth/errors";

/** Runs a page's data access; a record the user may not see becomes the not-found page. */
export async function loadOr404<T>(load: () => Promise<T>): Promise<T> {
  try {
    return await load();
  } catch (err) {
    if (err instanceof HttpError && err.status === 404) notFound();
    throw err;
  }
}
