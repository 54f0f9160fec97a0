"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useState } from "react";
import { cn } from "@/lib/cn";
import type { NavItem } from "@/lib/nav";

export function AppNav({ items }: { items: NavItem[] }) {
  const path = usePathname();
  const [open, setOpen] = useState(false);
  return (
    <nav aria-label="Main">
      <button
        type="button"
        className="min-h-11 rounded-lg border border-line px-3 text-sm font-bold md:hidden"
        aria-expanded={open}
        aria-controls="main-nav"
        onClick={() => setOpen((o) => !o)}
      >
        Menu
      </button>
      <ul id="main-nav" className={cn("mt-2 flex-col gap-1 md:mt-0 md:flex md:flex-row md:flex-wrap", open ? "flex" : "hidden")}>
        {items.map((item) => {
          const active = path === item.href || (item.href !== "/dashboard" && path.startsWith(item.href));
          return (
            <li key={item.href}>
              <Link
                href={item.href}
                aria-current={active ? "page" : undefined}
                onClick={() => setOpen(false)}
                className={cn(
                  "flex min-h-11 items-center rounded-lg px-3 text-sm font-bold hover:bg-raised",
                  active ? "bg-raised text-accent" : "text-fg",
                )}
              >
                {item.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
