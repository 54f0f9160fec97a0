import type { ReactNode } from "react";
import { AppNav } from "@/components/shell/app-nav";
import { Logo } from "@/components/shell/logo";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { ThemeToggle } from "@/components/shell/theme-toggle";
import { pageContext } from "@/lib/auth/guard";
import { navFor } from "@/lib/nav";

export default async function AppLayout({ children }: { children: ReactNode }) {
  const { user } = await pageContext();
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-line bg-surface">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-2 px-4 py-2">
          <Logo href="/dashboard" />
          <div className="order-last w-full md:order-none md:w-auto md:flex-1">
            <AppNav items={navFor(user.role)} />
          </div>
          <div className="ml-auto flex items-center gap-1">
            <span className="hidden text-sm text-muted sm:inline" data-testid="signed-in-as">
              {user.name ?? user.email} · {user.role}
            </span>
            <ThemeToggle />
            <SignOutButton />
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-7xl flex-1 px-4 py-6">
        {children}
      </main>
    </div>
  );
}
