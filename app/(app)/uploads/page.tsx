import Link from "next/link";
import { buttonVariants } from "@/components/ui/button";
import { EmptyState, PageHeader } from "@/components/ui/card";
import { formatBytes } from "@/components/uploads/progress-bar";
import { pageContext } from "@/lib/auth/guard";
import { listUploads } from "@/lib/uploads/service";

export const metadata = { title: "Uploads" };

const STATUS_TONE: Record<string, string> = {
  done: "text-ok",
  failed: "text-danger",
  importing: "text-accent",
  queued: "text-muted",
  stored: "text-muted",
};

export default async function UploadsPage() {
  const ctx = await pageContext(["volunteer", "steward"], "/uploads");
  const rows = await listUploads({ ctx });
  return (
    <div>
      <PageHeader
        title="Uploads"
        lead="Logger files sent for your stations, with what became of each line."
        actions={
          <Link href="/uploads/new" className={buttonVariants()}>
            Upload a log
          </Link>
        }
      />
      {rows.length === 0 ? (
        <EmptyState title="No uploads yet">
          When a meter has no network, upload its log file here. <Link href="/uploads/new" className="text-accent underline">Upload a log</Link>.
        </EmptyState>
      ) : (
        <div className="overflow-x-auto rounded-card border border-line" tabIndex={0} aria-label="Uploads">
          <table className="w-full min-w-[44rem] text-left text-sm">
            <caption className="sr-only">Your uploads, newest first</caption>
            <thead className="bg-raised">
              <tr>
                <th scope="col" className="px-3 py-2">File</th>
                <th scope="col" className="px-3 py-2">Station</th>
                <th scope="col" className="px-3 py-2">Size</th>
                <th scope="col" className="px-3 py-2">SHA-256</th>
                <th scope="col" className="px-3 py-2">Uploaded</th>
                <th scope="col" className="px-3 py-2">Status</th>
                <th scope="col" className="px-3 py-2 text-right">Accepted / rows</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((u) => (
                <tr key={u.id} className="border-t border-line">
                  <td className="px-3 py-2">
                    <Link href={`/uploads/${u.id}`} className="inline-flex min-h-11 items-center break-all text-accent underline">
                      {u.filename}
                    </Link>
                  </td>
                  <td className="px-3 py-2">{u.stationName}</td>
                  <td className="px-3 py-2 font-mono">{formatBytes(u.sizeBytes)}</td>
                  <td className="px-3 py-2 font-mono text-xs" title={u.sha256}>
                    {u.sha256.slice(0, 12)}…
                  </td>
                  <td className="px-3 py-2">
                    <time dateTime={u.createdAt.toISOString()}>{u.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC</time>
                  </td>
                  <td className={`px-3 py-2 font-bold ${STATUS_TONE[u.status] ?? ""}`}>{u.status}</td>
                  <td className="px-3 py-2 text-right font-mono">
                    {u.accepted.toLocaleString("en")} / {u.rowsRead.toLocaleString("en")}
                    {u.rejectedCount > 0 ? <span className="block text-xs text-warn">{u.rejectedCount.toLocaleString("en")} rejected</span> : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
