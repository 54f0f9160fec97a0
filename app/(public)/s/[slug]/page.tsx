import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { SitePage } from "@/components/sites/site-page";
import { getDb } from "@/db";
import { AppError } from "@/lib/errors";
import { getSiteSummary } from "@/lib/sites/service";

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ slug: string }> };

async function load(slug: string) {
  // The public page never uses the session: everyone sees the same, personal data removed.
  return getSiteSummary({ ctx: { user: null, db: getDb() }, input: { slug, publicView: true } }).catch((err: unknown) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
}

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { slug } = await params;
  const s = await load(slug);
  return { title: s.site.name, description: s.site.description };
}

export default async function PublicSitePage({ params }: Props) {
  const { slug } = await params;
  return <SitePage summary={await load(slug)} />;
}
