import { PageHeader } from "@/components/ui/card";
import { ConvertClient } from "./client";

export const metadata = { title: "Converter", description: "What a sky-brightness reading in mag/arcsec² means: luminance, natural-sky ratio, naked-eye limit." };

export default function ConvertPage() {
  return (
    <div className="max-w-4xl">
      <PageHeader
        title="What does a reading mean?"
        lead="Zenith sky brightness is measured in magnitudes per square arcsecond (mag/arcsec²). A bigger number is a darker sky, and 5 magnitudes is a factor of 100 in brightness."
      />
      <ConvertClient />
      <p className="mt-6 text-sm text-muted">
        The same numbers as JSON: <code className="font-mono">/api/v1/convert?mag=21.5</code>, <code className="font-mono">?luminanceCdM2=0.00027</code>,{" "}
        <code className="font-mono">?nelm=6.2</code>, or <code className="font-mono">?mag=21.5&amp;mag2=20.5</code> for a difference.
      </p>
    </div>
  );
}
