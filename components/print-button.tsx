"use client";

/** Opens the browser's print dialog (print to paper or to PDF); the page's print styles do the rest. */
export function PrintButton({ label = "Print or save as PDF" }: { label?: string }) {
  return (
    <button type="button" className="btn print:hidden" onClick={() => window.print()}>
      {label}
    </button>
  );
}
