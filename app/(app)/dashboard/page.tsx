import Link from "next/link";
import { Card, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { navFor } from "@/lib/nav";

export const metadata = { title: "Overview" };

const ROLE_LEAD: Record<string, string> = {
  volunteer: "Your stations, your uploads and your field surveys.",
  steward: "Your sites: how dark they are, whether they are brightening, and the stations that report from them.",
  advocate: "Sites' records, hearing briefs and glow estimates for planning hearings.",
  admin: "Everything in the network, and the people in it.",
};

export default async function DashboardPage() {
  const { user } = await pageContext();
  const items = navFor(user.role).filter((n) => n.href !== "/dashboard");
  return (
    <div>
      <PageHeader title={`Good evening${user.name ? `, ${user.name.split(" ")[0]}` : ""}`} lead={ROLE_LEAD[user.role]} />
      <ul className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
        {items.map((n) => (
          <li key={n.href}>
            <Link href={n.href} className="block h-full">
              <Card className="h-full hover:border-accent">
                <span className="font-bold">{n.label}</span>
              </Card>
            </Link>
          </li>
        ))}
      </ul>
    </div>
  );
}
