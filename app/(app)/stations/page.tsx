import { DateTime } from "luxon";
import Link from "next/link";
import { buttonVariants } from "@/components/ui/button";
import { EmptyState, PageHeader } from "@/components/ui/card";
import { NightSparkline } from "@/components/stations/night-sparkline";
import { pageContext } from "@/lib/auth/guard";
import { listMyStations, type MyStation } from "@/lib/stations/mine";

export const metadata = { title: "My stations" };
export const dynamic = "force-dynamic";

const APPROVAL = { none: "not in a site", pending: "awaiting approval", approved: "approved", declined: "declined" } as const;

export default async function MyStationsPage() {
  const ctx = await pageContext(undefined, "/stations");
  const mine = await listMyStations({ ctx });
  const owned = mine.filter((s) => s.relation === "owner");
  const stewarded = mine.filter((s) => s.relation === "steward");
  return (
    <div>
      <PageHeader
        title="My stations"
        lead="Your meters, and those of the sites you steward: the latest reading, the latest night and its curve."
        actions={
          <Link href="/stations/new" className={buttonVariants()}>
            Register a station
          </Link>
        }
      />
      {mine.length === 0 ? (
        <EmptyState title="No stations yet">
          Register the spot where your meter stands, then connect the meter with a station token.{" "}
          <Link href="/stations/new" className="text-accent underline">Register a station</Link>
        </EmptyState>
      ) : (
        <div className="flex flex-col gap-8">
          {owned.length > 0 ? <StationList title="Stations you keep" stations={owned} /> : null}
          {stewarded.length > 0 ? <StationList title="Stations of the sites you steward" stations={stewarded} /> : null}
        </div>
      )}
    </div>
  );
}

function StationList({ title, stations }: { title: string; stations: MyStation[] }) {
  const id = title.toLowerCase().replace(/\W+/g, "-");
  return (
    <section aria-labelledby={id}>
      <h2 id={id} className="mb-3 text-lg font-bold">{title}</h2>
      <ul className="grid gap-4 md:grid-cols-2 xl:grid-cols-3" data-testid="my-stations">
        {stations.map((s) => (
          <li key={s.slug} className="flex flex-col gap-3 rounded-card border border-line bg-surface p-4">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h3 className="font-bold">
                <Link href={`/stations/${s.slug}`} className="text-accent underline">{s.name}</Link>
              </h3>
              <p className="text-xs text-muted">
                {s.status === "retired" ? "retired" : "active"} · {APPROVAL[s.approval]}
              </p>
            </div>
            <p className="text-sm text-muted">{s.siteName ?? "Not inside a site"}</p>
            <dl className="grid grid-cols-2 gap-2 text-sm">
              <div>
                <dt className="text-muted">Last reading</dt>
                <dd>
                  {s.lastReadingAt ? (
                    <>
                      <span className="font-mono">{s.lastReadingMag?.toFixed(2)}</span> at{" "}
                      <time dateTime={s.lastReadingAt}>{DateTime.fromISO(s.lastReadingAt, { zone: s.timeZone }).toFormat("d LLL HH:mm")}</time>
                    </>
                  ) : (
                    "none yet"
                  )}
                </dd>
              </div>
              <div>
                <dt className="text-muted">Latest night{s.lastNight ? ` (${s.lastNight.night})` : ""}</dt>
                <dd>
                  {s.lastNight ? (
                    s.lastNight.medianMag !== null ? (
                      <>
                        median <span className="font-mono">{s.lastNight.medianMag.toFixed(2)}</span>, {s.lastNight.usableReadings}/{s.lastNight.readings} usable, {s.lastNight.usableHours.toFixed(1)} h
                      </>
                    ) : (
                      `no usable readings (${s.lastNight.readings} taken)`
                    )
                  ) : (
                    "none yet"
                  )}
                </dd>
              </div>
            </dl>
            {s.curve.length > 1 ? (
              <NightSparkline points={s.curve} label={`Curve of the night of ${s.lastNight?.night}: ${s.curve.length} sampled readings; higher is darker.`} />
            ) : (
              <p className="flex h-16 items-center justify-center rounded-lg border border-dashed border-line text-xs text-muted">No curve yet</p>
            )}
          </li>
        ))}
      </ul>
    </section>
  );
}
