import Link from "next/link";
import { cn } from "@/lib/cn";

const ITEMS = [
  { href: "/admin/users", label: "People" },
  { href: "/admin/requests", label: "Join requests" },
  { href: "/admin/sites", label: "Sites and stewards" },
  { href: "/admin/stations", label: "Stations" },
  { href: "/admin/audit", label: "Audit log" },
];

/** The admin section's own tabs (the main navigation lists only its first page). */
export function AdminNav({ current }: { current: string }) {
  return (
    <nav aria-label="Admin" className="mb-6 overflow-x-auto">
      <ul className="flex gap-1 border-b border-line">
        {ITEMS.map((i) => (
          <li key={i.href}>
            <Link
              href={i.href}
              aria-current={i.href === current ? "page" : undefined}
              className={cn(
                "flex min-h-11 items-center whitespace-nowrap rounded-t-lg px-3 text-sm font-bold hover:bg-raised",
                i.href === current ? "border-b-2 border-accent text-accent" : "text-fg",
              )}
            >
              {i.label}
            </Link>
          </li>
        ))}
      </ul>
    </nav>
  );
}

/** Previous/next links that keep the current filters. */
export function Pager({ page, pageSize, total, href }: { page: number; pageSize: number; total: number; href: (page: number) => string }) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  if (pages <= 1) return null;
  const link = "flex min-h-11 items-center rounded-lg border border-line px-4 text-sm font-bold hover:bg-raised";
  return (
    <nav aria-label="Pages" className="mt-4 flex items-center justify-between gap-2">
      {page > 1 ? (
        <Link className={link} href={href(page - 1)} rel="prev">
          ← Previous
        </Link>
      ) : (
        <span />
      )}
      <span className="text-sm text-muted">
        Page {page} of {pages} · {total} in all
      </span>
      {page < pages ? (
        <Link className={link} href={href(page + 1)} rel="next">
          Next →
        </Link>
      ) : (
        <span />
      )}
    </nav>
  );
}

export function qs(params: Record<string, string | number | undefined>) {
  const sp = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== "" && !(k === "page" && v === 1)) sp.set(k, String(v));
  const s = sp.toString();
  return s ? `?${s}` : "";
}
