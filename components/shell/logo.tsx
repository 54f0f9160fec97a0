import Link from "next/link";

/** Nightmark's mark: a crescent over a horizon line. */
export function Logo({ href = "/" }: { href?: string }) {
  return (
    <Link href={href} className="flex min-h-11 items-center gap-2 font-bold" aria-label="Nightmark home">
      <svg width="28" height="28" viewBox="0 0 28 28" aria-hidden="true">
        <path d="M17 4a9 9 0 1 0 7 14A10 10 0 0 1 17 4z" fill="rgb(var(--nm-accent))" />
        <rect x="2" y="24" width="24" height="2" rx="1" fill="rgb(var(--nm-muted))" />
      </svg>
      <span className="text-lg tracking-wide">Nightmark</span>
    </Link>
  );
}
