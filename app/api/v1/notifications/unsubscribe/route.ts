import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { updateSettingsByToken } from "@/lib/alerts/service";
import { route } from "@/lib/http/respond";

/**
 * One-click unsubscribe (RFC 8058): mail clients POST here with the token from the
 * List-Unsubscribe header; alert e-mails and the digest are turned off. The token is the authorisation.
 */
export const POST = route(async (req) => {
  const token = new URL(req.url).searchParams.get("token") ?? "";
  const ctx = await context();
  const r = await updateSettingsByToken({
    ctx,
    input: { token, alertsEmail: false, weeklyDigest: false },
  });
  return NextResponse.json({ ok: true, ...r });
});
