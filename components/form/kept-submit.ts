"use client";

import { startTransition, type FormEvent } from "react";

/**
 * React 19 resets a form after its `action` runs, which would wipe what the user typed when the
 * server refuses it. Dispatching the action from onSubmit keeps the inputs; the `action` attribute
 * stays for browsers without JavaScript.
 */
export function keptSubmit(
  conformOnSubmit: (event: FormEvent<HTMLFormElement>) => void,
  dispatch: (formData: FormData) => void,
): (event: FormEvent<HTMLFormElement>) => void {
  return (event) => {
    conformOnSubmit(event);
    if (event.defaultPrevented) return;
    event.preventDefault();
    const submitter = (event.nativeEvent as SubmitEvent).submitter;
    const formData = new FormData(event.currentTarget, submitter);
    startTransition(() => dispatch(formData));
  };
}
