"use client";

import { signOut } from "next-auth/react";

export function SignOutButton() {
  return (
    <button
      type="button"
      onClick={() => signOut({ callbackUrl: "/" })}
      className="min-h-11 rounded-lg px-3 text-sm font-bold text-muted hover:bg-raised hover:text-fg"
    >
      Sign out
    </button>
  );
}
