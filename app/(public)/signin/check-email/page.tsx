import Link from "next/link";

export default function CheckEmailPage() {
  return (
    <div className="mx-auto max-w-md">
      <h1 className="text-2xl font-bold">Check your e-mail</h1>
      <p className="mt-3 text-muted">
        We sent a sign-in link. It works once, for 15 minutes. In the demo, the message is in the local inbox that{" "}
        <code>npm start</code> prints.
      </p>
      <Link href="/signin" className="mt-4 inline-block text-accent underline">
        Back to sign-in
      </Link>
    </div>
  );
}
