"use client";

import { ErrorNotice } from "@/components/error-notice";

export default function AuthError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <main id="main" className="mx-auto max-w-xl px-4 py-16">
      <ErrorNotice title="This page could not be shown" digest={error.digest} reset={reset} />
    </main>
  );
}
