import { PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { GLOW_ESTIMATE_CAUTION } from "@/lib/glow";
import { glowSites, listMyGlowEstimates } from "@/lib/glow-estimates/service";
import { GlowClient } from "./client";

export const dynamic = "force-dynamic";

export default async function GlowPage() {
  const ctx = await pageContext(["advocate", "steward"], "/glow");
  const [sites, saved] = await Promise.all([glowSites({ ctx }), listMyGlowEstimates({ ctx })]);
  return (
    <>
      <PageHeader title="Glow estimate" lead="What a proposed development could add to the sky glow at nearby sites: Walker's law, scaled from each site's measured brightness." />
      <GlowClient sites={sites} saved={saved} caution={GLOW_ESTIMATE_CAUTION} />
    </>
  );
}
