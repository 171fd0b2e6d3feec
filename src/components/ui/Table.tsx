import type { ReactNode } from "react";

/**
 * A table in a card that scrolls sideways when narrow, with small uppercase column headings; the
 * rows are the children. Name it for screen readers with a hidden `caption` or with `label`.
 * Plain markup, so server pages and client components both use it.
 */
export function CardTable({
  columns,
  caption,
  label,
  className,
  children,
}: {
  columns: string[];
  caption?: string;
  label?: string;
  className?: string;
  children: ReactNode;
}) {
  return (
    <div className={`${className ? `${className} ` : ""}overflow-x-auto rounded-card border border-line bg-surface`}>
      <table className="w-full text-left text-body" aria-label={label}>
        {caption ? <caption className="sr-only">{caption}</caption> : null}
        <thead className="border-b border-line bg-surface-sunk text-caption uppercase tracking-wide text-fg-faint">
          <tr>
            {columns.map((c) => (
              <th key={c} scope="col" className="px-3 py-2 font-medium">
                {c}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>{children}</tbody>
      </table>
    </div>
  );
}
