"use client";

import { ErrorNotice } from "@/components/error-notice";

export default function WorkspaceError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return <ErrorNotice title="This page could not be shown" digest={error.digest} reset={reset} />;
}
