"use client";

import { useEffect, useRef, useState, type ReactNode } from "react";

/**
 * The wrapper of a table that may be wider than the screen (DEVELOPERS.md, Layout). A named region
 * always; while its content is wider than it, it also takes keyboard focus, so that a keyboard user
 * can reach it and scroll it with the arrow keys. When everything fits it is no tab stop.
 */
export function ScrollRegion({ label, className = "", children, testId }: { label: string; className?: string; children: ReactNode; testId?: string }) {
  const ref = useRef<HTMLDivElement>(null);
  const [overflows, setOverflows] = useState(false);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const check = () => setOverflows(el.scrollWidth > el.clientWidth + 1);
    check();
    const ro = new ResizeObserver(check);
    ro.observe(el);
    for (const child of Array.from(el.children)) ro.observe(child);
    // Inside a closed <details> the browser skips the region's layout and its observer stays silent,
    // so a width change made while it was closed is measured again when the window resizes or a
    // details element opens (measured: a slow-enrolment table left unreachable at 390 px).
    window.addEventListener("resize", check);
    document.addEventListener("toggle", check, true);
    return () => {
      ro.disconnect();
      window.removeEventListener("resize", check);
      document.removeEventListener("toggle", check, true);
    };
  }, []);
  return (
    <div
      ref={ref}
      role="region"
      aria-label={label}
      tabIndex={overflows ? 0 : undefined}
      data-scrolls={overflows || undefined}
      data-testid={testId}
      className={`relative overflow-x-auto ${className}`}
    >
      {children}
    </div>
  );
}
