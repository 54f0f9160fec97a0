import { randomInt } from "node:crypto";
import accounts from "../../db/seed/demo-accounts.json" with { type: "json" };
import { appUrl } from "./env";

export type DemoRole = "admin" | "steward" | "advocate" | "volunteer";

/** The first demo account of each role (db/seed/demo-accounts.json). */
export function demoAccount(role: DemoRole): { email: string; password: string; name: string } {
  const a = accounts.find((x) => x.role === role);
  if (!a) throw new Error(`no demo account with role ${role}`);
  return a;
}

/** A fetch bound to one cookie jar, as a browser tab would be. */
export type SessionFetch = ((path: string, init?: RequestInit) => Promise<Response>) & {
  cookies: Map<string, string>;
  email: string;
};

function jar(): SessionFetch {
  const cookies = new Map<string, string>();
  // Each session looks like its own client address, so the per-address sign-in limit (30 per
  // 15 minutes, lib/auth/rate-limit.ts) does not trip when a test run signs in many times.
  const ip = `198.51.100.${randomInt(1, 255)}`;
  const f = (async (path: string, init: RequestInit = {}) => {
    const headers = new Headers(init.headers);
    if (cookies.size) headers.set("cookie", [...cookies].map(([k, v]) => `${k}=${v}`).join("; "));
    headers.set("x-forwarded-for", ip);
    const res = await fetch(path.startsWith("http") ? path : appUrl(path), { redirect: "manual", cache: "no-store", ...init, headers });
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair!.indexOf("=");
      const name = pair!.slice(0, i).trim();
      const value = pair!.slice(i + 1).trim();
      if (/max-age=0|expires=thu, 01 jan 1970/i.test(c) || value === "") cookies.delete(name);
      else cookies.set(name, value);
    }
    return res;
  }) as SessionFetch;
  f.cookies = cookies;
  f.email = "";
  return f;
}

/** A signed-out fetch with its own cookie jar. */
export const anonymous = (): SessionFetch => jar();

export type SignInResult = { ok: true; fetch: SessionFetch } | { ok: false; error: string; status: number };

/**
 * Signs in through next-auth's credentials callback, as the sign-in form does:
 * GET /api/auth/csrf (keeps the csrf cookie), then POST /api/auth/callback/password form-encoded.
 */
export async function trySignIn(email: string, password: string): Promise<SignInResult> {
  const f = jar();
  f.email = email;
  const csrf = await f("/api/auth/csrf");
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await f("/api/auth/callback/password", {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ csrfToken, email, password, json: "true", callbackUrl: appUrl("/dashboard") }).toString(),
  });
  const body = (await res.json().catch(() => ({}))) as { url?: string };
  const error = body.url ? new URL(body.url, appUrl("/")).searchParams.get("error") : null;
  const hasSession = [...f.cookies.keys()].some((k) => k.includes("next-auth.session-token"));
  if (error || !hasSession) return { ok: false, error: error ?? `HTTP ${res.status}`, status: res.status };
  return { ok: true, fetch: f };
}

/** Signed-in fetch with its cookie jar; throws when sign-in is refused. */
export async function signInAs(email: string, password: string): Promise<SessionFetch> {
  const r = await trySignIn(email, password);
  if (!r.ok) throw new Error(`sign-in as ${email} refused: ${r.error}`);
  return r.fetch;
}

/** Signs in as the demo account of a role. */
export const signInAsRole = (role: DemoRole) => {
  const a = demoAccount(role);
  return signInAs(a.email, a.password);
};
