import Link from "next/link";
import { buttonVariants } from "@/components/ui/button";
import { EmptyState, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { listUploadStations } from "@/lib/uploads/service";
import { UploadWizard } from "./client";

export const metadata = { title: "Upload a log" };

export default async function NewUploadPage() {
  const ctx = await pageContext(["volunteer", "steward"], "/uploads/new");
  const stations = await listUploadStations({ ctx });
  return (
    <div className="max-w-5xl">
      <PageHeader
        title="Upload a log"
        lead="A file your meter's logger wrote: comma-, semicolon- or tab-separated text with a header row. Check the columns in the preview, then send it."
      />
      {stations.length === 0 ? (
        <EmptyState title="No station to upload for">
          Uploads go to a station you run. <Link href="/stations/new" className={buttonVariants({ variant: "secondary", size: "sm" })}>Register a station</Link>
        </EmptyState>
      ) : (
        <UploadWizard stations={stations.map((s) => ({ slug: s.slug, name: s.name, timeZone: s.timeZone, siteName: s.siteName }))} />
      )}
    </div>
  );
}
