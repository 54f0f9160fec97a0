import type { HTMLAttributes, ReactNode } from "react";
import { cn } from "@/lib/cn";

export function Card({ className, ...props }: HTMLAttributes<HTMLElement>) {
  return <section className={cn("rounded-card border border-line bg-surface p-4 sm:p-6", className)} {...props} />;
}

export function PageHeader({ title, lead, actions }: { title: string; lead?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="text-2xl font-bold sm:text-3xl">{title}</h1>
        {lead ? <p className="mt-1 max-w-prose text-muted">{lead}</p> : null}
      </div>
      {actions}
    </header>
  );
}

export function Notice({ tone = "info", title, children }: { tone?: "info" | "warn" | "danger" | "ok"; title?: string; children: ReactNode }) {
  const tones = {
    info: "border-accent/50 bg-accent/10",
    warn: "border-warn/60 bg-warn/10",
    danger: "border-danger/60 bg-danger/10",
    ok: "border-ok/60 bg-ok/10",
  };
  return (
    <div role={tone === "danger" ? "alert" : "note"} className={cn("rounded-lg border p-3 text-sm", tones[tone])}>
      {title ? <p className="mb-1 font-bold">{title}</p> : null}
      {children}
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-card border border-dashed border-line p-8 text-center">
      <p className="font-bold">{title}</p>
      {children ? <div className="mt-2 text-sm text-muted">{children}</div> : null}
    </div>
  );
}
