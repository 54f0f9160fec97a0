import Link from "next/link";

export default function Forbidden() {
  return (
    <main id="main" className="mx-auto max-w-lg px-4 py-16">
      <h1 className="text-2xl font-bold">Not for your role</h1>
      <p className="mt-3 text-muted">Your account does not have access to this page. If you need it, ask an admin of your network.</p>
      <Link href="/dashboard" className="mt-4 inline-block text-accent underline">
        Back to your overview
      </Link>
    </main>
  );
}
