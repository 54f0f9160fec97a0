import Link from "next/link";
import { notFound } from "next/navigation";
import { Card, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { findStationForViewer, stationThresholds } from "@/lib/stations/access";
import { listCalibrations } from "@/lib/stations/calibrations";
import { lastNightOf } from "@/lib/stations/readings";
import { listTokens } from "@/lib/stations/tokens";
import { env } from "@/lib/env";
import { sql } from "drizzle-orm";
import { StationClient } from "./client";

type Props = { params: Promise<{ slug: string }>; searchParams: Promise<{ night?: string }> };

export async function generateMetadata({ params }: Props) {
  return { title: `Station ${(await params).slug}` };
}

const APPROVAL_TEXT = {
  none: "not in a site",
  pending: "waiting for the site's stewards to approve it",
  approved: "approved: counts toward the site",
  declined: "declined by the site's stewards",
} as const;

export default async function StationPage({ params, searchParams }: Props) {
  const { slug } = await params;
  const { night } = await searchParams;
  const ctx = await pageContext(undefined, `/stations/${slug}`);
  let viewer;
  try {
    viewer = await findStationForViewer({ ctx, input: { slug } });
  } catch (err) {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  }
  const { loaded, canManage, seesOwnerEmail } = viewer;
  const st = loaded.station;
  const [range] = (
    await ctx.db.execute<{ first: string | null; last: string | null }>(
      sql`SELECT to_char(min(night), 'YYYY-MM-DD') AS first, to_char(max(night), 'YYYY-MM-DD') AS last FROM night_summaries WHERE station_id = ${st.id}::uuid`,
    )
  ).rows;
  const calibrations = await listCalibrations(ctx, st.id);
  const tokens = canManage ? await listTokens({ ctx, input: { stationSlug: slug } }) : [];
  const lastNight = lastNightOf(st.timeZone);
  const initialNight = night && /^\d{4}-\d{2}-\d{2}$/.test(night) ? night : lastNight;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={st.name}
        lead={
          <>
            {loaded.site ? (
              <>
                In <Link className="text-accent underline" href={`/sites/${loaded.site.slug}`}>{loaded.site.name}</Link>
              </>
            ) : (
              "Not inside a site"
            )}
            {" · "}kept by {loaded.owner.name ?? "a volunteer"}
            {seesOwnerEmail ? (
              <>
                {" "}(<a className="text-accent underline" href={`mailto:${loaded.owner.email}`}>{loaded.owner.email}</a>)
              </>
            ) : null}
          </>
        }
        actions={
          <Link href="/stations" className="text-sm text-accent underline">
            All my stations
          </Link>
        }
      />
      <Card>
        <dl className="grid grid-cols-2 gap-x-6 gap-y-2 text-sm sm:grid-cols-4">
          <div>
            <dt className="text-muted">Status</dt>
            <dd data-testid="station-status">{st.status === "retired" ? `retired${st.retiredAt ? ` ${st.retiredAt.toISOString().slice(0, 10)}` : ""}` : "active"}</dd>
          </div>
          <div>
            <dt className="text-muted">Approval</dt>
            <dd>{APPROVAL_TEXT[st.approval]}</dd>
          </div>
          <div>
            <dt className="text-muted">Time zone</dt>
            <dd>{st.timeZone}</dd>
          </div>
          <div>
            <dt className="text-muted">Position</dt>
            <dd>
              {st.lat.toFixed(4)}, {st.lon.toFixed(4)}
              {st.elevationM != null ? ` · ${Math.round(st.elevationM)} m` : ""}
            </dd>
          </div>
          <div className="col-span-2 sm:col-span-4">
            <dt className="text-muted">Meter</dt>
            <dd>{st.deviceDescription || "—"}</dd>
          </div>
        </dl>
      </Card>
      <StationClient
        station={{ slug: st.slug, name: st.name, timeZone: st.timeZone, retired: st.status === "retired" }}
        thresholds={stationThresholds(loaded)}
        initialNight={initialNight}
        lastNight={lastNight}
        firstNight={range?.first ?? null}
        latestNight={range?.last ?? null}
        canManage={canManage}
        calibrations={calibrations.map((c) => ({ ...c, createdAt: c.createdAt.toISOString() }))}
        tokens={tokens.map((t) => ({ ...t, createdAt: t.createdAt.toISOString(), lastUsedAt: t.lastUsedAt?.toISOString() ?? null, revokedAt: t.revokedAt?.toISOString() ?? null }))}
        appUrl={env().APP_URL}
      />
    </div>
  );
}
