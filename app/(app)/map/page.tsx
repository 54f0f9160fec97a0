import { PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { listSitesForViewer } from "@/lib/sites/service";
import { periodOptions } from "@/lib/map/period";
import { MapClient } from "./client";

export const metadata = { title: "Map" };
export const dynamic = "force-dynamic";

export default async function MapPage() {
  const ctx = await pageContext(undefined, "/map");
  const sites = await listSitesForViewer({ ctx });
  return (
    <div>
      <PageHeader
        title="Map"
        lead="Sites and stations you may see, coloured on the darkness ramp by their median zenith brightness over the period (bigger mag/arcsec² = darker sky)."
      />
      <MapClient sites={sites.map((s) => ({ slug: s.slug, name: s.name }))} periods={periodOptions()} />
    </div>
  );
}
