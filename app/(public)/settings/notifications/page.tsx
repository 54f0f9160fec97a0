import { redirect } from "next/navigation";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { getMyNotificationSettings, getSettingsByToken } from "@/lib/alerts/service";
import { context } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { NotificationForm } from "./client";

export const metadata = { title: "Notification settings" };

type Search = Promise<Record<string, string | string[] | undefined>>;

/**
 * Lives in (public) so that the link in an e-mail works signed out: with ?token=… it changes that
 * person's e-mail settings only; without a token it needs a session.
 */
export default async function NotificationSettingsPage({ searchParams }: { searchParams: Search }) {
  const sp = await searchParams;
  const token = (Array.isArray(sp.token) ? sp.token[0] : sp.token) || undefined;
  const ctx = await context();
  if (token) {
    const s = await getSettingsByToken({ ctx, input: { token } }).catch((err) => {
      if (err instanceof AppError || (err as { name?: string }).name === "ZodError") return null;
      throw err;
    });
    return (
      <div className="max-w-xl">
        <PageHeader
          title="E-mail from Nightmark"
          lead={
            s
              ? `Settings for ${s.email}. No sign-in needed: this link only changes these two settings.`
              : undefined
          }
        />
        {s ? (
          <Card>
            <NotificationForm
              token={token}
              alertsEmail={s.alertsEmail}
              weeklyDigest={s.weeklyDigest}
            />
          </Card>
        ) : (
          <Notice tone="danger" title="This link does not work">
            It may be mistyped or from an old e-mail. Sign in and open Settings → Notifications
            instead.
          </Notice>
        )}
      </div>
    );
  }
  if (!ctx.user) redirect(`/signin?callbackUrl=${encodeURIComponent("/settings/notifications")}`);
  const s = await getMyNotificationSettings({ ctx });
  return (
    <div className="max-w-xl">
      <PageHeader title="Notifications" lead={`E-mail goes to ${s.email}.`} />
      <Card>
        <NotificationForm alertsEmail={s.alertsEmail} weeklyDigest={s.weeklyDigest} />
      </Card>
    </div>
  );
}
