import Link from "next/link";
import type { ReactNode } from "react";
import { Logo } from "@/components/shell/logo";
import { ThemeToggle } from "@/components/shell/theme-toggle";

export default function PublicLayout({ children }: { children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-line">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center justify-between gap-2 px-4 py-2">
          <Logo />
          <nav aria-label="Public" className="flex flex-wrap items-center gap-1">
            <Link href="/convert" className="flex min-h-11 items-center rounded-lg px-3 text-sm font-bold hover:bg-raised">
              Converter
            </Link>
            <Link href="/signin" className="flex min-h-11 items-center rounded-lg px-3 text-sm font-bold hover:bg-raised">
              Sign in
            </Link>
            <ThemeToggle />
          </nav>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-6xl flex-1 px-4 py-8">
        {children}
      </main>
      <footer className="border-t border-line px-4 py-4 text-center text-xs text-muted">
        Nightmark — readings are approximations with stated uncertainty; lighting design and code compliance belong to qualified
        lighting professionals and local codes.
      </footer>
    </div>
  );
}
