import type { ReactNode } from "react";
import { pageContext } from "@/lib/auth/guard";

/**
 * The role check sits in the layout, above the loading boundary, so a volunteer gets a real 403
 * (a check inside a streamed page could only render the 403 page after a 200 had gone out).
 */
export default async function AlertsLayout({ children }: { children: ReactNode }) {
  await pageContext(["steward"], "/alerts");
  return children;
}
