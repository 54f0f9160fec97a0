"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { Button, buttonVariants } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { queryKeys } from "@/lib/query-keys";
import type { UploadView } from "@/lib/uploads/service";
import { formatBytes, ProgressBar } from "./progress-bar";

const STATUS_TEXT: Record<UploadView["status"], string> = {
  stored: "Stored, waiting to be queued",
  queued: "Queued for import",
  importing: "Importing",
  done: "Imported",
  failed: "Import failed",
};

async function fetchUpload(id: string): Promise<UploadView> {
  const res = await fetch(`/api/v1/uploads/${id}`, { cache: "no-store" });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The upload could not be loaded (HTTP ${res.status}).`);
  return body as UploadView;
}

/** An upload's import, polled every second until it is done or failed, then its result. */
export function UploadResult({ id, initial }: { id: string; initial?: UploadView }) {
  const qc = useQueryClient();
  const q = useQuery({
    queryKey: queryKeys.upload(id),
    queryFn: () => fetchUpload(id),
    initialData: initial,
    staleTime: 0,
    refetchInterval: (query) => {
      const s = query.state.data?.status;
      return s === "done" || s === "failed" ? false : 1000;
    },
  });
  const retry = useMutation({
    mutationFn: async () => {
      const res = await fetch(`/api/v1/uploads/${id}/retry`, { method: "POST" });
      const body = await res.json().catch(() => null);
      if (!res.ok) throw new Error(body?.error?.message ?? `Retry refused (HTTP ${res.status}).`);
      return body as UploadView;
    },
    onSuccess: (u) => qc.setQueryData(queryKeys.upload(id), u),
  });

  if (q.isPending) return <p role="status" className="text-muted">Loading the upload…</p>;
  if (q.isError && !q.data) return <Notice tone="danger" title="Could not load the upload">{q.error.message}</Notice>;
  const u = q.data!;
  const finished = u.status === "done" || u.status === "failed";

  return (
    <Card className="flex flex-col gap-4" aria-labelledby={`upload-${id}-title`}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id={`upload-${id}-title`} className="text-lg font-bold">
          {u.filename}
        </h2>
        <span className="text-sm text-muted">
          {u.station.name} · {formatBytes(u.sizeBytes)}
        </span>
      </div>
      <p className="break-all font-mono text-xs text-muted" title="SHA-256 of the original file">
        SHA-256 {u.sha256}
      </p>

      <div aria-live="polite" className="flex flex-col gap-3">
        <p className="text-sm">
          <span className="font-bold">Status:</span> {STATUS_TEXT[u.status]}
          {u.attempts > 1 ? ` (attempt ${u.attempts})` : ""}
        </p>
        {!finished ? (
          <ProgressBar
            label="Import progress"
            value={u.bytesProcessed}
            max={u.sizeBytes}
            detail={`${formatBytes(u.bytesProcessed)} of ${formatBytes(u.sizeBytes)} · ${u.rowsRead.toLocaleString("en")} rows`}
          />
        ) : null}
        {u.status === "failed" ? (
          <Notice tone="danger" title="The import did not finish">
            <p>{u.error ?? "The import stopped."}</p>
            <p className="mt-1">
              The file is kept. Retrying starts from its first line; readings already stored are recognised and not stored twice,
              and the upload is only marked imported once every line was read.
            </p>
          </Notice>
        ) : null}
        {u.status === "queued" && u.error ? <Notice tone="warn">{u.error}</Notice> : null}
      </div>

      {u.status === "failed" || u.status === "stored" ? (
        <div className="flex flex-wrap items-center gap-3">
          <Button onClick={() => retry.mutate()} disabled={retry.isPending}>
            {retry.isPending ? "Queuing…" : "Retry the import"}
          </Button>
          {retry.isError ? (
            <p role="alert" className="text-sm text-danger">
              {retry.error.message}
            </p>
          ) : null}
        </div>
      ) : null}

      {finished || u.rowsRead > 0 ? (
        <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
          {[
            ["Rows read", u.rowsRead],
            ["Accepted", u.accepted],
            ["Already stored (duplicates)", u.duplicates],
            ["Rejected", u.rejectedCount],
          ].map(([label, n]) => (
            <div key={label as string} className="rounded-lg border border-line bg-raised p-3">
              <dt className="text-xs text-muted">{label}</dt>
              <dd className="font-mono text-xl font-bold">{(n as number).toLocaleString("en")}</dd>
            </div>
          ))}
        </dl>
      ) : null}

      {u.status === "done" && u.rejectedCount === 0 ? <Notice tone="ok">Every line of the file was read; none was rejected.</Notice> : null}

      {u.rejectedCount > 0 ? (
        <section aria-labelledby={`rej-${id}`}>
          <h3 id={`rej-${id}`} className="mb-2 font-bold">
            Rejected lines{" "}
            <span className="font-normal text-muted">
              ({u.rejectedCount.toLocaleString("en")}
              {u.rejectedCount > u.rejections.length ? `; the first ${u.rejections.length.toLocaleString("en")} are listed` : ""})
            </span>
          </h3>
          <div className="max-h-96 overflow-auto rounded-lg border border-line" tabIndex={0} aria-label="Rejected lines">
            <table className="w-full text-left text-sm">
              <thead className="sticky top-0 bg-raised">
                <tr>
                  <th scope="col" className="px-3 py-2">
                    Line
                  </th>
                  <th scope="col" className="px-3 py-2">
                    Reason
                  </th>
                </tr>
              </thead>
              <tbody>
                {u.rejections.map((r) => (
                  <tr key={r.line} className="border-t border-line">
                    <td className="px-3 py-1 font-mono">{r.line}</td>
                    <td className="px-3 py-1">{r.reason}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ) : null}

      {finished ? (
        <div className="flex flex-wrap gap-3">
          <Link href="/uploads/new" className={buttonVariants({ variant: "secondary" })}>
            Upload another file
          </Link>
          <Link href="/uploads" className={buttonVariants({ variant: "ghost" })}>
            All my uploads
          </Link>
        </div>
      ) : null}
    </Card>
  );
}
