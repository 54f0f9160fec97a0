import { notFound } from "next/navigation";
import { SitePage } from "@/components/sites/site-page";
import { pageContext } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { getSiteSummary } from "@/lib/sites/service";

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ slug: string }> };

export default async function SitePageRoute({ params }: Props) {
  const { slug } = await params;
  const ctx = await pageContext(undefined, `/sites/${slug}`);
  const summary = await getSiteSummary({ ctx, input: { slug } }).catch((err: unknown) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  return <SitePage summary={summary} />;
}
