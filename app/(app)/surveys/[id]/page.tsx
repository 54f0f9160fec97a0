import { DateTime } from "luxon";
import Link from "next/link";
import { notFound } from "next/navigation";
import { Card, PageHeader } from "@/components/ui/card";
import { FieldCautions } from "@/components/surveys/field-cautions";
import { pageContext } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { explainFlags, flagNames, formatSigned } from "@/lib/flags";
import { DEFAULT_SCREEN_THRESHOLDS } from "@/ingest/screening/screen";
import { getSurvey } from "@/lib/surveys/service";

export const metadata = { title: "Field survey" };
export const dynamic = "force-dynamic";

type Props = { params: Promise<{ id: string }> };

export default async function SurveyPage({ params }: Props) {
  const { id } = await params;
  const ctx = await pageContext(undefined, `/surveys/${id}`);
  let data;
  try {
    data = await getSurvey({ ctx, input: { id } });
  } catch (err) {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  }
  const { survey, points } = data;
  const counted = points.filter((p) => p.flags === 0).length;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={survey.title}
        lead={`${points.length} spot${points.length === 1 ? "" : "s"}, ${counted} counted · logged ${survey.createdAt.toISOString().slice(0, 10)}`}
        actions={<Link href="/surveys" className="text-sm text-accent underline">All my walks</Link>}
      />
      {survey.notes ? <Card><p className="whitespace-pre-line text-sm">{survey.notes}</p></Card> : null}
      <ol className="flex flex-col gap-4" data-testid="survey-spots">
        {points.map((p, i) => {
          const names = flagNames(p.flags);
          const why = explainFlags(p.flags, { mag: p.medianMag, sunAltDeg: p.sunAltDeg, moonAltDeg: p.moonAltDeg, moonFraction: p.moonFraction }, DEFAULT_SCREEN_THRESHOLDS);
          return (
            <li key={p.id} className="rounded-card border border-line bg-surface p-4">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h2 className="font-bold">Spot {i + 1}</h2>
                <p className={`text-sm font-bold ${names.length === 0 ? "text-ok" : "text-warn"}`}>
                  {names.length === 0 ? "● Counted" : `▲ Not counted: ${names.join(", ")}`}
                </p>
              </div>
              <dl className="mt-2 grid grid-cols-2 gap-2 text-sm sm:grid-cols-4">
                <div><dt className="text-muted">Median</dt><dd className="font-mono">{p.medianMag.toFixed(2)} mag/arcsec²</dd></div>
                <div><dt className="text-muted">Spread (range)</dt><dd className="font-mono">{p.spreadMag.toFixed(2)}</dd></div>
                <div><dt className="text-muted">Readings</dt><dd className="font-mono">{p.values.map((v) => v.toFixed(2)).join(", ")}</dd></div>
                <div><dt className="text-muted">Time (UTC)</dt><dd>{DateTime.fromJSDate(p.takenAt, { zone: "utc" }).toFormat("yyyy-LL-dd HH:mm")}</dd></div>
                <div><dt className="text-muted">Position</dt><dd>{p.lat.toFixed(5)}, {p.lon.toFixed(5)}</dd></div>
                <div><dt className="text-muted">Sun / Moon</dt><dd>{formatSigned(p.sunAltDeg)}° / {formatSigned(p.moonAltDeg)}° ({Math.round(p.moonFraction * 100)} % lit)</dd></div>
                <div><dt className="text-muted">Sky</dt><dd>{p.conditions || "—"}</dd></div>
                {p.notes ? <div><dt className="text-muted">Notes</dt><dd>{p.notes}</dd></div> : null}
              </dl>
              <ul className="mt-2 list-disc pl-5 text-sm">
                {why.map((s) => <li key={s}>{s}</li>)}
              </ul>
            </li>
          );
        })}
      </ol>
      <FieldCautions />
    </div>
  );
}
