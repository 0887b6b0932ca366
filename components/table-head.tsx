import type { ReactNode } from "react";

/** A column heading: plain, right-aligned over numbers (`{ label, num: true }`), or false to leave it out. */
export type Column = ReactNode | { label: ReactNode; num: true } | false;

const isNum = (c: Column): c is { label: ReactNode; num: true } => typeof c === "object" && c !== null && "num" in c;

/** The header row every data table uses: one `th scope="col"` per column. */
export function TableHead({ columns }: { columns: Column[] }) {
  return (
    <thead>
      <tr>
        {columns.map((c, i) =>
          c === false ? null : (
            <th key={i} scope="col" className={isNum(c) ? "num" : undefined}>
              {isNum(c) ? c.label : c}
            </th>
          ),
        )}
      </tr>
    </thead>
  );
}
