import { RequestResetForm } from "./client";

export const metadata = { title: "Reset your password" };

export default function ResetPage() {
  return (
    <div className="mx-auto flex max-w-md flex-col gap-4">
      <h1 className="text-2xl font-bold">Reset your password</h1>
      <p className="text-muted">We e-mail you a link to choose a new one. Choosing it signs your account out on every device.</p>
      <RequestResetForm />
    </div>
  );
}
