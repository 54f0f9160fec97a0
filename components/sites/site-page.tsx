import Link from "next/link";
import { buttonVariants } from "@/components/ui/button";
import { Card, PageHeader } from "@/components/ui/card";
import type { SiteSummary } from "@/lib/sites/service";
import { DarknessSummary } from "./darkness-summary";
import { SiteCharts } from "./site-charts";
import { StationsTable } from "./stations-table";

const ZONE_WORDS: Record<string, string> = {
  E0: "E0, intrinsically dark",
  E1: "E1, dark",
  E2: "E2, low district brightness",
  E3: "E3, medium district brightness",
  E4: "E4, high district brightness",
};

export type SitePageProps = { summary: SiteSummary };

/** A site's page, shared by the signed-in page and the public one (summary.mode says which). */
export function SitePage({ summary }: SitePageProps) {
  const s = summary.site;
  const pub = summary.mode === "public";
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={s.name}
        lead={s.description}
        actions={
          <div className="flex flex-wrap gap-2">
            {!pub ? (
              <Link href={`/map?site=${s.slug}`} className={buttonVariants({ variant: "secondary" })}>
                On the map
              </Link>
            ) : null}
            {!pub && s.isPublic ? (
              <Link href={`/s/${s.slug}`} className={buttonVariants({ variant: "secondary" })}>
                Public page
              </Link>
            ) : null}
            {summary.canEdit ? (
              <Link href={`/sites/${s.slug}/edit`} className={buttonVariants()}>
                Edit site
              </Link>
            ) : null}
          </div>
        }
      />
      <DarknessSummary summary={summary} />
      <SiteCharts slug={s.slug} publicView={pub} targetMag={s.targetMag} />
      <Card>
        <h2 className="mb-3 font-bold">Stations</h2>
        {pub && s.roundPublicPositions ? <p className="mb-2 text-sm text-muted">Positions on this public page are rounded to about 1 km.</p> : null}
        <StationsTable stations={summary.stations} linkStations={!pub} />
      </Card>
      <Card>
        <h2 className="mb-2 font-bold">About this site&apos;s numbers</h2>
        <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
          <dt className="text-muted">Time zone</dt>
          <dd>{s.timeZone}</dd>
          <dt className="text-muted">Target darkness</dt>
          <dd>{s.targetMag.toFixed(2)} mag/arcsec²</dd>
          <dt className="text-muted">Lighting zone (CIE 150)</dt>
          <dd>{s.lightingZone ? ZONE_WORDS[s.lightingZone] : "not set"}</dd>
          <dt className="text-muted">Screening</dt>
          <dd>
            sun below {s.thresholds.sunMaxAltDeg}°, moon below {s.thresholds.moonMaxAltDeg}°, cloud if readings spread more than{" "}
            {s.thresholds.cloudSpreadMag} mag in {s.thresholds.cloudWindowMin} min
          </dd>
        </dl>
        <ul className="mt-3 list-disc pl-5 text-sm text-muted">
          {Object.values(summary.definitions).map((d) => (
            <li key={d}>{d}</li>
          ))}
          <li>Readings are approximations with stated uncertainty; a zenith reading is not a compliance measurement.</li>
        </ul>
      </Card>
    </div>
  );
}
