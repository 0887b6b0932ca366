"use client";

import { createContext, useContext, useState, type ReactNode } from "react";

/**
 * Whether the scenario form holds changes not yet saved: the form says so, and the panels that show
 * the saved figures (planner, justifications, enrolment) read it to say that they do not follow yet.
 */
type UnsavedSignal = { unsaved: boolean; setUnsaved: (unsaved: boolean) => void };

const UnsavedChanges = createContext<UnsavedSignal>({ unsaved: false, setUnsaved: () => {} });

export function UnsavedChangesProvider({ children }: { children: ReactNode }) {
  const [unsaved, setUnsaved] = useState(false);
  return <UnsavedChanges value={{ unsaved, setUnsaved }}>{children}</UnsavedChanges>;
}

export const useUnsavedChanges = () => useContext(UnsavedChanges);

/** Said in a panel of saved figures while the form above has unsaved changes. */
export function SavedVersionNote({ what, version, testId }: { what: string; version: number; testId: string }) {
  const { unsaved } = useUnsavedChanges();
  if (!unsaved) return null;
  return (
    <p className="alert text-sm" role="status" data-testid={testId}>
      The form above has unsaved changes: {what} the saved version {version}, and will follow your changes once you save them.
    </p>
  );
}
