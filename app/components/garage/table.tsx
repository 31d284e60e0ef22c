import type { ReactNode } from "react";
import { Link, useSearchParams } from "react-router";

/** A column header that sorts the table through the URL (?sort=…&dir=…), so the server does the work. */
export function SortHeader({ column, children, align = "left", defaultSort, defaultDir = "asc", className }: {
  column: string;
  children: ReactNode;
  align?: "left" | "right";
  defaultSort: string;
  /** The order the server uses when the URL names none. */
  defaultDir?: "asc" | "desc";
  className?: string;
}) {
  const [params] = useSearchParams();
  const current = params.get("sort") ?? defaultSort;
  const named = params.get("dir");
  const dir = named === "desc" || named === "asc" ? named : defaultDir;
  const next = new URLSearchParams(params);
  next.set("sort", column);
  next.set("dir", current === column && dir === "asc" ? "desc" : "asc");
  const active = current === column;
  return (
    <th scope="col" aria-sort={active ? (dir === "asc" ? "ascending" : "descending") : "none"} className={`px-3 py-2 font-medium ${align === "right" ? "text-right" : "text-left"} ${className ?? ""}`}>
      <Link to={`?${next}`} className="hover:text-accent" preventScrollReset>
        {children}
        <span aria-hidden className="ml-1 text-ink-faint">
          {active ? (dir === "asc" ? "▲" : "▼") : "↕"}
        </span>
      </Link>
    </th>
  );
}

export function Num({ children, className }: { children: ReactNode; className?: string }) {
  return <td className={`num px-3 py-1.5 text-right ${className ?? ""}`}>{children}</td>;
}

export function UnitsLink({ system }: { system: "metric" | "imperial" }) {
  const [params] = useSearchParams();
  const next = new URLSearchParams(params);
  next.set("units", system === "metric" ? "imperial" : "metric");
  return (
    <Link to={`?${next}`} className="text-sm text-accent underline" preventScrollReset>
      {system === "metric" ? "Imperial units (in · lb · lbf/in)" : "Metric units (mm · kg · N/mm)"}
    </Link>
  );
}
