import Link from "next/link";
import { buttonVariants } from "@/components/ui/button";
import { EmptyState, PageHeader } from "@/components/ui/card";
import { FieldCautions } from "@/components/surveys/field-cautions";
import { pageContext } from "@/lib/auth/guard";
import { listMySurveys } from "@/lib/surveys/service";

export const metadata = { title: "Field surveys" };
export const dynamic = "force-dynamic";

export default async function SurveysPage() {
  const ctx = await pageContext(["volunteer", "steward"], "/surveys");
  const list = await listMySurveys({ ctx });
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Field surveys"
        lead="Handheld readings from a walk: several readings at each spot, combined as their median."
        actions={<Link href="/surveys/new" className={buttonVariants()}>Log a walk</Link>}
      />
      <FieldCautions />
      {list.length === 0 ? (
        <EmptyState title="No walks logged yet">
          <Link href="/surveys/new" className="text-accent underline">Log your first walk</Link> — it works on a phone, in the field.
        </EmptyState>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2" data-testid="survey-list">
          {list.map((s) => (
            <li key={s.id} className="rounded-card border border-line bg-surface p-4">
              <h2 className="font-bold">
                <Link href={`/surveys/${s.id}`} className="text-accent underline">{s.title}</Link>
              </h2>
              <p className="text-sm text-muted">
                {s.spots} spot{s.spots === 1 ? "" : "s"} · logged {s.createdAt.toISOString().slice(0, 10)}
              </p>
              {s.notes ? <p className="mt-1 line-clamp-2 text-sm">{s.notes}</p> : null}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
