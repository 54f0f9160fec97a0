import type { MultiPolygon, Polygon } from "geojson";
import { PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { siteBoundaries } from "@/lib/stations/register";
import { RegisterStationForm } from "./client";

export const metadata = { title: "Register a station" };

export default async function NewStationPage() {
  const ctx = await pageContext(["volunteer", "steward"], "/stations/new");
  const sites = await siteBoundaries({ ctx });
  return (
    <div className="max-w-3xl">
      <PageHeader title="Register a station" lead="A fixed spot where a meter measures the zenith every night." />
      <RegisterStationForm sites={sites.map((s) => ({ id: s.id, name: s.name, boundary: s.boundary as Polygon | MultiPolygon }))} />
    </div>
  );
}
