import type { MultiPolygon, Polygon } from "geojson";
import { PageHeader } from "@/components/ui/card";
import { FieldCautions } from "@/components/surveys/field-cautions";
import { pageContext } from "@/lib/auth/guard";
import { siteBoundaries } from "@/lib/stations/register";
import { SurveyForm } from "./client";

export const metadata = { title: "Log a survey walk" };

export default async function NewSurveyPage() {
  const ctx = await pageContext(["volunteer", "steward"], "/surveys/new");
  const sites = await siteBoundaries({ ctx });
  return (
    <div className="flex max-w-3xl flex-col gap-6">
      <PageHeader title="Log a survey walk" lead="Add a spot for each place you measured; take several readings there and they are combined as their median." />
      <FieldCautions />
      <SurveyForm sites={sites.map((s) => ({ id: s.id, name: s.name, boundary: s.boundary as Polygon | MultiPolygon }))} />
    </div>
  );
}
