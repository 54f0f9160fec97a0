import Link from "next/link";
import { buttonVariants } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { listPublicSites } from "@/lib/sites/public";

export const dynamic = "force-dynamic";

export default async function LandingPage() {
  const publicSites = await listPublicSites().catch(() => []);
  return (
    <div className="flex flex-col gap-10">
      <section className="max-w-3xl">
        <h1 className="text-3xl font-bold sm:text-5xl">Nightmark keeps count of the dark.</h1>
        <p className="mt-4 text-lg text-muted">
          Volunteers&apos; sky meters report how bright the zenith is, in magnitudes per square arcsecond (mag/arcsec²; a bigger
          number is a darker sky). Nightmark takes every reading in, screens out daylight, twilight, moonlight and cloud, turns
          each station&apos;s night into one trustworthy number, and watches whether each site is getting brighter.
        </p>
        <div className="mt-6 flex flex-wrap gap-3">
          <Link href="/signin" className={buttonVariants()}>
            Sign in
          </Link>
          <Link href="/join" className={buttonVariants({ variant: "secondary" })}>
            Ask to join as a volunteer
          </Link>
          <Link href="/convert" className={buttonVariants({ variant: "ghost" })}>
            What does a reading mean?
          </Link>
        </div>
      </section>
      <section aria-labelledby="who" className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <h2 id="who" className="sr-only">
          Who uses Nightmark
        </h2>
        {[
          ["Volunteers", "Connect a meter with a station token, upload logger files, record field surveys, and see which readings counted and why."],
          ["Stewards", "Keep a park's boundary, target darkness and stations; get an e-mail when the site is brightening."],
          ["Advocates", "Turn a site's record into a hearing brief a planning board can read, with the raw evidence behind it."],
          ["Everyone", "Read the public page of any site its steward has opened to the public."],
        ].map(([title, text]) => (
          <Card key={title}>
            <h3 className="font-bold">{title}</h3>
            <p className="mt-2 text-sm text-muted">{text}</p>
          </Card>
        ))}
      </section>
      <section aria-labelledby="public-sites">
        <h2 id="public-sites" className="text-xl font-bold">
          Public sites
        </h2>
        {publicSites.length === 0 ? (
          <p className="mt-2 text-muted">No site has been made public yet.</p>
        ) : (
          <ul className="mt-3 grid gap-3 sm:grid-cols-2">
            {publicSites.map((s) => (
              <li key={s.slug}>
                <Link href={`/s/${s.slug}`} className="block rounded-card border border-line bg-surface p-4 hover:border-accent">
                  <span className="font-bold">{s.name}</span>
                  <span className="mt-1 block text-sm text-muted">{s.description}</span>
                </Link>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
