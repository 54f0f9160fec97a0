import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { listPendingStations } from "@/lib/stations/register";
import { DecideStationForm } from "./client";

export const metadata = { title: "Stations awaiting approval" };

export default async function ApprovalsPage() {
  const ctx = await pageContext(["steward"], "/approvals");
  const rows = await listPendingStations({ ctx });
  return (
    <div>
      <PageHeader
        title="Stations awaiting approval"
        lead="Volunteers registered these stations inside a site you keep. Their readings are kept either way; approval decides whether they count toward the site."
      />
      {rows.length === 0 ? (
        <EmptyState title="Nothing to approve">You get an e-mail when a station is registered inside your site.</EmptyState>
      ) : (
        <ul className="grid gap-4 md:grid-cols-2">
          {rows.map((s) => (
            <li key={s.id}>
              <Card>
                <h2 className="font-bold">{s.name}</h2>
                <p className="text-sm text-muted">in {s.siteName}</p>
                <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
                  <dt className="text-muted">Volunteer</dt>
                  <dd className="break-all">
                    {s.ownerName ?? "—"} · <a className="text-accent underline" href={`mailto:${s.ownerEmail}`}>{s.ownerEmail}</a>
                  </dd>
                  <dt className="text-muted">Position</dt>
                  <dd className="font-mono">
                    {s.lat.toFixed(5)}, {s.lon.toFixed(5)}
                  </dd>
                  <dt className="text-muted">Device</dt>
                  <dd>{s.deviceDescription || "—"}</dd>
                  <dt className="text-muted">Field of view</dt>
                  <dd>{s.fieldOfViewDeg ? `${s.fieldOfViewDeg}°` : "—"}</dd>
                  <dt className="text-muted">Registered</dt>
                  <dd>{s.createdAt.toISOString().slice(0, 10)}</dd>
                </dl>
                <DecideStationForm stationId={s.id} name={s.name} />
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
