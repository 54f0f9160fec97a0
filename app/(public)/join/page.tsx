import Link from "next/link";
import { JoinForm } from "./client";

export const metadata = { title: "Ask to join" };

export default function JoinPage() {
  return (
    <div className="mx-auto flex max-w-md flex-col gap-4">
      <h1 className="text-2xl font-bold">Join the network</h1>
      <p className="text-muted">
        Volunteers run sky meters at fixed spots, upload logger files and walk field surveys. Tell us who you are; an admin approves
        requests and e-mails you a link to set your password.
      </p>
      <JoinForm />
      <p className="text-sm text-muted">
        Already a member?{" "}
        <Link href="/signin" className="text-accent underline">
          Sign in
        </Link>
        .
      </p>
    </div>
  );
}
