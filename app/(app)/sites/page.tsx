import Link from "next/link";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { RAMP_BANDS, rampClass } from "@/lib/map/ramp";
import { listSitesForViewer } from "@/lib/sites/service";
import { cn } from "@/lib/cn";

export const metadata = { title: "Sites" };
export const dynamic = "force-dynamic";

const SWATCH = ["bg-ramp-0", "bg-ramp-1", "bg-ramp-2", "bg-ramp-3", "bg-ramp-4", "bg-ramp-5", "bg-ramp-6"];

export default async function SitesPage() {
  const ctx = await pageContext(undefined, "/sites");
  const sites = await listSitesForViewer({ ctx });
  return (
    <div>
      <PageHeader title="Sites" lead="Parks and reserves in the network that you may see: public sites and the ones you steward." />
      {sites.length === 0 ? (
        <EmptyState title="No sites to show" />
      ) : (
        <ul className="grid gap-3 md:grid-cols-2">
          {sites.map((s) => {
            const c = s.medianMag === null ? null : rampClass(s.medianMag);
            return (
              <li key={s.slug}>
                <Link href={`/sites/${s.slug}`} className="block h-full">
                  <Card className="h-full hover:border-accent">
                    <div className="flex items-start justify-between gap-3">
                      <div>
                        <h2 className="font-bold">{s.name}</h2>
                        <p className="text-xs text-muted">
                          {s.isPublic ? "Public" : "Private"} · {s.stations} active station{s.stations === 1 ? "" : "s"}
                          {s.lightingZone ? ` · zone ${s.lightingZone}` : ""}
                          {s.steward ? " · you steward it" : ""}
                        </p>
                      </div>
                      <div className="text-right">
                        <p className="flex items-center justify-end gap-2 font-mono text-xl font-bold tabular-nums">
                          {c !== null ? <span className={cn("inline-block h-3 w-3 rounded-full border border-fg/60", SWATCH[c])} aria-hidden /> : null}
                          {s.medianMag === null ? "—" : s.medianMag.toFixed(2)}
                        </p>
                        <p className="text-xs text-muted">{c === null ? "no usable nights" : `mag/arcsec² · ${RAMP_BANDS[c]?.words}`}</p>
                      </div>
                    </div>
                    <p className="mt-2 text-sm text-muted">{s.description}</p>
                    <p className="mt-1 text-xs text-muted">
                      Target {s.targetMag.toFixed(1)} · {s.nights} recent nights{s.lastNight ? ` · last ${s.lastNight}` : ""}
                    </p>
                  </Card>
                </Link>
              </li>
            );
          })}
        </ul>
      )}
    </div>
  );
}
