import { EmailChange } from "@/components/account/email-change";
import { PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { SettingsForms } from "./client";

export const metadata = { title: "Settings" };

export default async function SettingsPage() {
  const { user } = await pageContext();
  return (
    <div className="max-w-xl">
      <PageHeader title="Your account" lead={`${user.email} · ${user.role}`} />
      <SettingsForms name={user.name ?? ""} />
      <div className="mt-6">
        <EmailChange currentEmail={user.email} />
      </div>
    </div>
  );
}
