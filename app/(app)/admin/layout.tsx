import type { ReactNode } from "react";
import { pageContext } from "@/lib/auth/guard";

/**
 * The role check sits in the layout, above the pages' loading boundaries: a check inside a
 * streamed page could only render the 403 page after a 200 status had gone out.
 */
export default async function AdminLayout({ children }: { children: ReactNode }) {
  await pageContext(["admin"]);
  return children;
}
