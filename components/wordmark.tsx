export function Wordmark({ size = "md" }: { size?: "md" | "lg" }) {
  const big = size === "lg";
  return (
    <span className={`inline-flex items-center gap-2 font-serif font-semibold ${big ? "text-2xl" : "text-lg"}`}>
      <svg aria-hidden="true" viewBox="0 0 24 24" className={big ? "h-8 w-8" : "h-6 w-6"}>
        <path d="M12 3 L21.5 20 H2.5 Z" fill="none" stroke="currentColor" strokeWidth="2.2" strokeLinejoin="round" />
        <path d="M6.5 15.5 H17.5" stroke="#8a6a1f" strokeWidth="2" />
      </svg>
      Delta Ledger
    </span>
  );
}
