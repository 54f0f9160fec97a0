import { PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { briefSiteChoices, defaultBriefPeriod } from "@/lib/briefs/service";
import { listMyGlowEstimates } from "@/lib/glow-estimates/service";
import { BriefsClient } from "./client";

export const dynamic = "force-dynamic";

export default async function BriefsPage() {
  const ctx = await pageContext(["advocate", "steward"], "/briefs");
  const [sites, estimates] = await Promise.all([briefSiteChoices({ ctx }), listMyGlowEstimates({ ctx })]);
  const period = defaultBriefPeriod();
  return (
    <>
      <PageHeader
        title="Hearing briefs"
        lead="A PDF of a site's record for a period that a planning board can read, with the raw evidence behind it. Readings and estimates are approximations with stated uncertainty; a zenith reading is not a compliance measurement."
      />
      <BriefsClient
        sites={sites}
        estimates={estimates.map((e) => ({ id: e.id, name: e.name, createdAt: e.createdAt }))}
        defaults={period}
      />
    </>
  );
}
