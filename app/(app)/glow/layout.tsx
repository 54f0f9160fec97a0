import type { ReactNode } from "react";
import { pageContext } from "@/lib/auth/guard";

/** The role check sits in the layout, above loading.tsx: inside a streamed page a 403 could only follow a 200. */
export default async function EvidenceLayout({ children }: { children: ReactNode }) {
  await pageContext(["advocate", "steward"]);
  return children;
}
