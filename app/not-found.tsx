import Link from "next/link";

export default function NotFound() {
  return (
    <main id="main" className="mx-auto max-w-lg px-4 py-16">
      <h1 className="text-2xl font-bold">Not found</h1>
      <p className="mt-3 text-muted">There is nothing here, or it is not public.</p>
      <Link href="/" className="mt-4 inline-block text-accent underline">
        Nightmark home
      </Link>
    </main>
  );
}
