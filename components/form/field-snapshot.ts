import type { FieldMetadata } from "@conform-to/react";

/**
 * Conform builds a fresh metadata object on every property read of a field (that is how it tracks
 * what a render used), and getInputProps alone reads about sixteen. On the scenario form (83
 * controls) those reads were a fifth of the page's server render and much of its garbage (CPU
 * profile under `npm run bench:load`). Reading once the properties our controls use, into a plain
 * object, keeps conform's own prop helpers (getInputProps, getSelectProps, getTextareaProps read
 * nothing else that our forms set) and its render tracking, at a third of the reads. Length, range
 * and pattern constraints and `required` are left out: our forms validate with zod and ask conform
 * for none.
 */
export function snapshotField<T>(meta: FieldMetadata<T>): FieldMetadata<T> {
  return {
    id: meta.id,
    name: meta.name,
    formId: meta.formId,
    key: meta.key,
    errors: meta.errors,
    errorId: meta.errorId,
    initialValue: meta.initialValue,
  } as unknown as FieldMetadata<T>;
}
