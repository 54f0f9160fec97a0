import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDb } from "@/db";
import { Card, PageHeader } from "@/components/ui/card";
import { AppError } from "@/lib/errors";
import { verifyCode } from "@/lib/briefs/service";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Verify a hearing brief · Nightmark", robots: { index: false } };

type Props = { params: Promise<{ code: string }> };

/** Public: which data a brief's verification code maps to (site, period, generated when); no personal data. */
export default async function VerifyPage({ params }: Props) {
  const { code } = await params;
  const result = await verifyCode({ ctx: { user: null, db: getDb() }, input: { code } }).catch((err: unknown) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  return (
    <div className="mx-auto max-w-3xl">
      <PageHeader
        title={`Verification code ${result.code}`}
        lead="This code was printed on a Nightmark hearing brief. It is a fingerprint of the exact data behind the brief; the same data always gives the same code."
      />
      <ul className="flex flex-col gap-4">
        {result.briefs.map((b, i) => (
          <li key={i}>
            <Card>
              <h2 className="text-lg font-bold">{b.sites.map((s) => s.name).join(", ")}</h2>
              <dl className="mt-3 grid grid-cols-1 gap-x-6 gap-y-2 text-sm sm:grid-cols-[auto_1fr]">
                <dt className="font-bold">Period (nights)</dt>
                <dd>
                  {b.from} to {b.to}
                </dd>
                <dt className="font-bold">Generated</dt>
                <dd>
                  <time dateTime={b.generatedAt}>{b.generatedAt.replace("T", " ").slice(0, 19)} UTC</time>
                </dd>
                <dt className="font-bold">Data</dt>
                <dd>
                  {b.nightRows} per-station night summaries from {b.stations} station{b.stations === 1 ? "" : "s"}
                </dd>
                <dt className="font-bold">Software</dt>
                <dd>Nightmark {b.softwareVersion}</dd>
                <dt className="font-bold">Data fingerprint (SHA-256)</dt>
                <dd className="break-all font-mono text-xs">{b.dataSha256}</dd>
                {b.pdfSha256 ? (
                  <>
                    <dt className="font-bold">PDF file (SHA-256)</dt>
                    <dd className="break-all font-mono text-xs">{b.pdfSha256}</dd>
                  </>
                ) : null}
              </dl>
            </Card>
          </li>
        ))}
      </ul>
      <p className="mt-6 text-sm text-muted">
        A brief&apos;s readings and estimates are approximations with stated uncertainty; a zenith reading is not a compliance measurement; lighting design and code compliance belong to
        qualified lighting professionals and the local codes.
      </p>
    </div>
  );
}
