import { eq } from "drizzle-orm";
import { forbidden, notFound } from "next/navigation";
import { PageHeader } from "@/components/ui/card";
import { sites } from "@/db/schema";
import { isSiteSteward, pageContext } from "@/lib/auth/guard";
import { EditSiteForm } from "./client";

export const metadata = { title: "Edit site" };
export const dynamic = "force-dynamic";

type Props = { params: Promise<{ slug: string }> };

export default async function EditSitePage({ params }: Props) {
  const { slug } = await params;
  const ctx = await pageContext(undefined, `/sites/${slug}/edit`);
  const [site] = await ctx.db.select().from(sites).where(eq(sites.slug, slug)).limit(1);
  if (!site) notFound();
  const steward = await isSiteSteward(ctx, site.id);
  if (!steward) {
    if (!site.isPublic) notFound();
    forbidden();
  }
  return (
    <div className="max-w-3xl">
      <PageHeader title={`Edit ${site.name}`} lead="Changes are recorded in the audit log with what they replaced." />
      <EditSiteForm
        slug={site.slug}
        initial={{
          name: site.name,
          description: site.description,
          timeZone: site.timeZone,
          targetMag: site.targetMag,
          sunMaxAltDeg: site.sunMaxAltDeg,
          moonMaxAltDeg: site.moonMaxAltDeg,
          cloudWindowMin: site.cloudWindowMin,
          cloudSpreadMag: site.cloudSpreadMag,
          isPublic: site.isPublic,
          roundPublicPositions: site.roundPublicPositions,
          lightingZone: site.lightingZone,
          boundaryType: site.boundary.type,
        }}
        timeZones={Intl.supportedValuesOf("timeZone")}
      />
    </div>
  );
}
