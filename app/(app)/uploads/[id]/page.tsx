import Link from "next/link";
import { notFound } from "next/navigation";
import { PageHeader } from "@/components/ui/card";
import { UploadResult } from "@/components/uploads/upload-result";
import { pageContext } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { getUpload } from "@/lib/uploads/service";

export const metadata = { title: "Upload" };

export default async function UploadPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const ctx = await pageContext(["volunteer", "steward"], `/uploads/${id}`);
  const upload = await getUpload({ ctx, input: { id, authorization: null } }).catch((err) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  return (
    <div className="max-w-4xl">
      <PageHeader title="Upload" lead={<Link href="/uploads" className="text-accent underline">All uploads</Link>} />
      <UploadResult id={upload.id} initial={upload} />
    </div>
  );
}
