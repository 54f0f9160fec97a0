import type { ReactNode } from "react";
import { pageContext } from "@/lib/auth/guard";

/** Uploading is for people who run stations; the role check sits above the loading boundaries. */
export default async function UploadsLayout({ children }: { children: ReactNode }) {
  await pageContext(["volunteer", "steward"]);
  return children;
}
