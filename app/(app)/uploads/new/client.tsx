"use client";

import { useMemo, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import { formatBytes, ProgressBar } from "@/components/uploads/progress-bar";
import { UploadResult } from "@/components/uploads/upload-result";
import { delimiterName, LogFormatError, rowInterpreter, sniff, SNIFF_BYTES, type LogMapping, type SniffResult } from "@/ingest/parse-log";
import { validateMag } from "@/ingest/screening/screen";
import type { UploadView } from "@/lib/uploads/service";

export type WizardStation = { slug: string; name: string; timeZone: string; siteName: string | null };

const MAX_BYTES = 60 * 1024 * 1024;

function zones(): string[] {
  try {
    return ["UTC", ...Intl.supportedValuesOf("timeZone").filter((z) => z !== "UTC")];
  } catch {
    return ["UTC"];
  }
}

type Sent = { upload: UploadView; duplicate: boolean };

export function UploadWizard({ stations }: { stations: WizardStation[] }) {
  const [slug, setSlug] = useState(stations[0]!.slug);
  const station = stations.find((s) => s.slug === slug)!;
  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<SniffResult | null>(null);
  const [previewError, setPreviewError] = useState<string>();
  const [reading, setReading] = useState(false);
  const [mapping, setMapping] = useState<Omit<LogMapping, "delimiter"> | null>(null);
  const [sentBytes, setSentBytes] = useState<number | null>(null);
  const [sendError, setSendError] = useState<string>();
  const [sent, setSent] = useState<Sent | null>(null);
  const xhrRef = useRef<XMLHttpRequest | null>(null);
  const allZones = useMemo(() => zones(), []);

  async function choose(f: File | null, tz = station.timeZone) {
    setFile(f);
    setPreview(null);
    setPreviewError(undefined);
    setMapping(null);
    setSendError(undefined);
    if (!f) return;
    if (f.size > MAX_BYTES) {
      setPreviewError(`This file is ${formatBytes(f.size)}; at most 60 MB can be uploaded at once. Split it into parts.`);
      return;
    }
    setReading(true);
    try {
      const head = new Uint8Array(await f.slice(0, SNIFF_BYTES).arrayBuffer());
      const s = sniff(head, { stationTimeZone: tz, complete: f.size <= SNIFF_BYTES });
      setPreview(s);
      setMapping({
        timeColumn: s.guessedMapping.timeColumn ?? s.columns[0]!,
        timeZone: s.guessedMapping.timeZone,
        magColumn: s.guessedMapping.magColumn ?? s.columns[1] ?? s.columns[0]!,
        tempColumn: s.guessedMapping.tempColumn,
      });
    } catch (err) {
      setPreviewError(err instanceof LogFormatError ? `This file cannot be read as a delimited log: ${err.message}.` : "The file could not be read.");
    } finally {
      setReading(false);
    }
  }

  // The sample rows as the import would read them with the chosen mapping (same code as the worker).
  const checked = useMemo(() => {
    if (!preview || !mapping) return null;
    try {
      const interpret = rowInterpreter(preview.columns, { ...mapping, delimiter: preview.delimiter });
      return preview.sampleRows.map((r) => {
        if (r.reason) return { line: r.line, text: r.reason, ok: false };
        const v = interpret(r.values);
        if (typeof v === "string") return { line: r.line, text: v, ok: false };
        const magErr = validateMag(v.mag);
        if (magErr) return { line: r.line, text: magErr, ok: false };
        return { line: r.line, text: `${v.takenAt.toISOString().replace(".000Z", "Z")} · ${v.mag} mag/arcsec²${v.tempC !== null ? ` · ${v.tempC} °C` : ""}`, ok: true };
      });
    } catch (err) {
      return [{ line: 0, text: (err as Error).message, ok: false }];
    }
  }, [preview, mapping]);

  function send() {
    if (!file || !preview || !mapping) return;
    setSendError(undefined);
    setSentBytes(0);
    const form = new FormData();
    // The mapping goes first, so the server has it before the file's bytes.
    form.append("mapping", JSON.stringify({ ...mapping, delimiter: preview.delimiter, tempColumn: mapping.tempColumn || null }));
    form.append("file", file, file.name);
    const xhr = new XMLHttpRequest();
    xhrRef.current = xhr;
    xhr.open("POST", `/api/v1/stations/${encodeURIComponent(slug)}/uploads`);
    xhr.responseType = "json";
    xhr.upload.onprogress = (e) => setSentBytes(e.lengthComputable ? e.loaded : Math.min(e.loaded, file.size));
    xhr.onerror = () => {
      setSentBytes(null);
      setSendError("The upload was interrupted (network). Nothing was imported; send it again.");
    };
    xhr.onabort = () => {
      setSentBytes(null);
      setSendError("Upload cancelled.");
    };
    xhr.onload = () => {
      const body = xhr.response as (UploadView & { duplicate?: boolean; error?: { message: string } }) | null;
      if (xhr.status === 202 || xhr.status === 200) {
        setSent({ upload: body as UploadView, duplicate: !!body?.duplicate });
      } else {
        setSentBytes(null);
        setSendError(body?.error?.message ?? `The upload was refused (HTTP ${xhr.status}).`);
      }
    };
    xhr.send(form);
  }

  if (sent) {
    return (
      <div className="flex flex-col gap-4">
        {sent.duplicate ? (
          <Notice tone="warn" title="Already uploaded">
            This station already has this exact file (same SHA-256), so it is not imported again. Here is the earlier upload.
          </Notice>
        ) : (
          <Notice tone="ok" title="File received">
            The original is stored with its checksum; the import runs in the background. You can leave this page and find it under Uploads.
          </Notice>
        )}
        <UploadResult id={sent.upload.id} initial={sent.upload} />
      </div>
    );
  }

  const uploading = sentBytes !== null;
  const cols = preview?.columns ?? [];

  return (
    <div className="flex flex-col gap-6">
      <Card className="grid gap-4 sm:grid-cols-2">
        <Field label="Station" htmlFor="up-station" hint={`Local times default to its zone, ${station.timeZone}.`}>
          <Select
            id="up-station"
            value={slug}
            disabled={uploading}
            aria-describedby="up-station-hint"
            onChange={(e) => {
              setSlug(e.target.value);
              const next = stations.find((s) => s.slug === e.target.value)!;
              if (file) void choose(file, next.timeZone);
            }}
          >
            {stations.map((s) => (
              <option key={s.slug} value={s.slug}>
                {s.name}
                {s.siteName ? ` (${s.siteName})` : ""}
              </option>
            ))}
          </Select>
        </Field>
        <Field label="Log file" htmlFor="up-file" error={previewError} hint="Text with a header row; up to 60 MB.">
          <Input
            id="up-file"
            type="file"
            accept=".csv,.txt,.tsv,.dat,.log,text/plain,text/csv"
            disabled={uploading}
            aria-invalid={previewError ? true : undefined}
            aria-describedby={previewError ? "up-file-error" : "up-file-hint"}
            className="py-2"
            onChange={(e) => void choose(e.target.files?.[0] ?? null)}
          />
        </Field>
      </Card>

      {reading ? (
        <p role="status" className="text-muted">
          Reading the start of the file…
        </p>
      ) : null}

      {preview && mapping ? (
        <Card className="flex flex-col gap-4" aria-labelledby="up-preview-title">
          <div>
            <h2 id="up-preview-title" className="text-lg font-bold">
              Preview
            </h2>
            <p className="text-sm text-muted">
              {file?.name} · {formatBytes(file?.size ?? 0)} · {delimiterName(preview.delimiter)}-separated · {cols.length} columns
              {preview.hasHeader ? ` · header on line ${preview.headerLine}` : " · no header row (columns numbered)"}
            </p>
          </div>

          {Object.keys(preview.metadata).length > 0 ? (
            <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[max-content_1fr]" aria-label="File metadata">
              {Object.entries(preview.metadata).map(([k, v]) => (
                <div key={k} className="contents">
                  <dt className="font-bold">{k}</dt>
                  <dd className="break-words text-muted">{v}</dd>
                </div>
              ))}
            </dl>
          ) : null}

          <fieldset className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4" disabled={uploading}>
            <legend className="mb-2 text-sm font-bold">Which column is which</legend>
            <Field label="Time column" htmlFor="up-time">
              <Select id="up-time" value={mapping.timeColumn} onChange={(e) => setMapping({ ...mapping, timeColumn: e.target.value })}>
                {cols.map((c) => (
                  <option key={c}>{c}</option>
                ))}
              </Select>
            </Field>
            <Field label="Its time zone" htmlFor="up-zone" hint="For times without an offset (Z or ±hh:mm).">
              <Select id="up-zone" value={mapping.timeZone} aria-describedby="up-zone-hint" onChange={(e) => setMapping({ ...mapping, timeZone: e.target.value })}>
                {[mapping.timeZone, station.timeZone, ...allZones]
                  .filter((z, i, a) => a.indexOf(z) === i)
                  .map((z) => (
                    <option key={z} value={z}>
                      {z === station.timeZone ? `${z} (the station's)` : z}
                    </option>
                  ))}
              </Select>
            </Field>
            <Field label="Brightness (mag/arcsec²)" htmlFor="up-mag">
              <Select id="up-mag" value={mapping.magColumn} onChange={(e) => setMapping({ ...mapping, magColumn: e.target.value })}>
                {cols.map((c) => (
                  <option key={c}>{c}</option>
                ))}
              </Select>
            </Field>
            <Field label="Temperature (°C)" htmlFor="up-temp">
              <Select id="up-temp" value={mapping.tempColumn ?? ""} onChange={(e) => setMapping({ ...mapping, tempColumn: e.target.value || null })}>
                <option value="">(none)</option>
                {cols.map((c) => (
                  <option key={c}>{c}</option>
                ))}
              </Select>
            </Field>
          </fieldset>

          <div className="overflow-x-auto rounded-lg border border-line" tabIndex={0} aria-label="First rows of the file">
            <table className="w-full text-left text-sm">
              <caption className="sr-only">The first {preview.sampleRows.length} data rows, and how each would be read</caption>
              <thead className="bg-raised">
                <tr>
                  <th scope="col" className="px-2 py-2">
                    Line
                  </th>
                  {cols.map((c) => (
                    <th key={c} scope="col" className="whitespace-nowrap px-2 py-2">
                      {c}
                    </th>
                  ))}
                  <th scope="col" className="px-2 py-2">
                    Read as
                  </th>
                </tr>
              </thead>
              <tbody>
                {preview.sampleRows.map((r, i) => {
                  const c = checked?.find((x) => x.line === r.line) ?? checked?.[i];
                  return (
                    <tr key={r.line} className="border-t border-line">
                      <td className="px-2 py-1 font-mono text-muted">{r.line}</td>
                      {cols.map((col, j) => (
                        <td key={col} className="whitespace-nowrap px-2 py-1 font-mono">
                          {r.values[j] ?? ""}
                        </td>
                      ))}
                      <td className={`px-2 py-1 ${c?.ok ? "text-ok" : "text-danger"}`}>
                        {c ? (c.ok ? "" : "Rejected: ") + c.text : ""}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
          {preview.sampleRows.length === 0 ? <Notice tone="warn">The start of the file has a header but no data rows.</Notice> : null}
          {checked?.[0]?.line === 0 ? <Notice tone="danger">{checked[0].text}</Notice> : null}

          {uploading ? (
            <div className="flex flex-col gap-3" aria-live="polite">
              <ProgressBar label="Sending the file" value={sentBytes ?? 0} max={file?.size ?? 1} detail={`${formatBytes(sentBytes ?? 0)} of ${formatBytes(file?.size ?? 0)}`} />
              <div>
                <Button variant="secondary" onClick={() => xhrRef.current?.abort()}>
                  Cancel
                </Button>
              </div>
            </div>
          ) : (
            <div className="flex flex-wrap items-center gap-3">
              <Button onClick={send} disabled={!file || checked?.[0]?.line === 0}>
                Upload and import
              </Button>
              <span className="text-sm text-muted">The original file is kept with its checksum; sending the same file again does not import it twice.</span>
            </div>
          )}
        </Card>
      ) : null}

      {sendError ? (
        <Notice tone="danger" title="Not uploaded">
          {sendError}
        </Notice>
      ) : null}
    </div>
  );
}
