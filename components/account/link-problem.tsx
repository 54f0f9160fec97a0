import Link from "next/link";
import { LINK_MESSAGES, type LinkProblem } from "@/lib/people/tokens";

export type LinkProblemNoticeProps = { problem: LinkProblem; again?: { href: string; label: string } };

/** The page a refused e-mail link shows: what went wrong, in plain words, and what to do next. */
export function LinkProblemNotice({ problem, again }: LinkProblemNoticeProps) {
  const m = LINK_MESSAGES[problem];
  return (
    <div className="mx-auto max-w-md" data-link-problem={problem}>
      <h1 className="text-2xl font-bold">{m.title}</h1>
      <p className="mt-3 text-muted">{m.body}</p>
      <div className="mt-6 flex flex-wrap gap-3">
        {again ? (
          <Link href={again.href} className="flex min-h-11 items-center rounded-lg bg-accent px-4 text-sm font-bold text-accent-fg">
            {again.label}
          </Link>
        ) : null}
        <Link href="/signin" className="flex min-h-11 items-center rounded-lg border border-line px-4 text-sm font-bold">
          Sign in
        </Link>
      </div>
    </div>
  );
}
