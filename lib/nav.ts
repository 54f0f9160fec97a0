import type { Role } from "@/db/schema";

export type NavItem = { href: string; label: string; roles: Role[] | "all" };

/** The signed-in navigation. Admins see everything. */
export const NAV: NavItem[] = [
  { href: "/dashboard", label: "Overview", roles: "all" },
  { href: "/map", label: "Map", roles: "all" },
  { href: "/stations", label: "My stations", roles: ["volunteer", "steward"] },
  { href: "/stations/new", label: "Register a station", roles: ["volunteer", "steward"] },
  { href: "/uploads/new", label: "Upload a log", roles: ["volunteer", "steward"] },
  { href: "/surveys", label: "Field surveys", roles: ["volunteer", "steward"] },
  { href: "/sites", label: "Sites", roles: "all" },
  { href: "/approvals", label: "Approvals", roles: ["steward"] },
  { href: "/alerts", label: "Alerts", roles: ["steward"] },
  { href: "/briefs", label: "Hearing briefs", roles: ["advocate", "steward"] },
  { href: "/glow", label: "Glow estimate", roles: ["advocate", "steward"] },
  { href: "/convert", label: "Converter", roles: "all" },
  { href: "/admin/users", label: "People", roles: [] },
  { href: "/admin/audit", label: "Audit log", roles: [] },
  { href: "/settings", label: "Settings", roles: "all" },
];

export function navFor(role: Role): NavItem[] {
  return NAV.filter((n) => role === "admin" || n.roles === "all" || n.roles.includes(role));
}
