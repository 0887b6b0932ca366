export default function Loading() {
  return (
    <div role="status" aria-live="polite" className="py-10 text-ink-soft">
      Loading…
    </div>
  );
}
