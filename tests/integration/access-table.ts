/**
 * THE authorisation matrix: every page, route handler and server action of the app, with what each
 * kind of visitor gets. tests/integration/access.test.ts walks app/ (and components/ for "use server"
 * files) and fails when something has no row here, then checks every row.
 *
 * Adding a row is one line:
 *   page("(app)/things/page.tsx", "/things", SIGNED_IN),
 *   api("GET", "api/v1/things/[id]/route.ts", "/api/v1/things/00000000-0000-4000-8000-000000000000", SIGNED_IN_API),
 *   action("app/(app)/things/actions.ts", "saveThing", SIGNED_IN_ACTION, (ctx) => saveThing({ ctx, input: {} })),
 *
 * Outcomes: "allow" (got past authorisation: 2xx, or a 400/409/422 about the input), "redirect" (3xx,
 * e.g. to /signin), 401, 403, 404 (things the caller may not see answer 404).
 * Columns, always in this order: signed out, volunteer, steward, advocate, admin (o(...) below).
 * Sample URLs with an all-zero-ish uuid or a made-up token must not change anything.
 *
 * Server actions cannot be called over HTTP in a test, so each row either gives `check`, which calls
 * the lib/ verb behind the action with a ctx per role (with deliberately invalid input, so nothing
 * is written) and classifies what it throws, or gives `covered` saying how it is checked instead.
 * Whatever the row says, the test also reads the action's source and requires a guard call
 * (requireUser / requireRole / requireSiteSteward) unless the row's outcome is "allow" for everyone.
 */
import type { Ctx } from "@/lib/auth/guard";
import { requestEmailChange } from "@/lib/people/email-change";
import { acceptInvitation, inviteUser } from "@/lib/people/invitations";
import { decideJoinRequest, requestToJoin } from "@/lib/people/join-requests";
import { requestPasswordReset, resetPassword } from "@/lib/people/password-reset";
import { addSiteSteward, removeSiteSteward } from "@/lib/people/site-stewards";
import { retireStation, transferStation } from "@/lib/people/stations-admin";
import { setUserRole, setUserStatus } from "@/lib/people/users";
import { confirmEmailChange } from "@/lib/people/email-change";
import { decideStationApproval, registerStation } from "@/lib/stations/register";
import { acknowledgeAlert, createDefaultRules, resolveAlert, updateMyNotificationSettings, updateRule, updateSettingsByToken } from "@/lib/alerts/service";
import { updateSite } from "@/lib/sites/service";
import { deleteGlowEstimate, saveGlowEstimate } from "@/lib/glow-estimates/service";

export const WHO = ["signedOut", "volunteer", "steward", "advocate", "admin"] as const;
export type Who = (typeof WHO)[number];
export type Outcome = "allow" | "redirect" | 401 | 403 | 404;
export type Expect = Record<Who, Outcome>;

/** Columns: signed out, volunteer, steward, advocate, admin. */
export const o = (signedOut: Outcome, volunteer: Outcome, steward: Outcome, advocate: Outcome, admin: Outcome): Expect => ({
  signedOut,
  volunteer,
  steward,
  advocate,
  admin,
});

// Presets for the common cases.
export const EVERYONE = o("allow", "allow", "allow", "allow", "allow");
export const SIGNED_IN = o("redirect", "allow", "allow", "allow", "allow");
export const ADMIN_PAGE = o("redirect", 403, 403, 403, "allow");
export const STEWARD_PAGE = o("redirect", 403, "allow", 403, "allow");
export const MEASURER_PAGE = o("redirect", "allow", "allow", 403, "allow");
export const SIGNED_OUT_ONLY = o("allow", "redirect", "redirect", "redirect", "redirect");
export const SIGNED_IN_API = o(401, "allow", "allow", "allow", "allow");
export const ADMIN_API = o(401, 403, 403, 403, "allow");
export const SIGNED_IN_ACTION = SIGNED_IN_API;
export const ADMIN_ACTION = ADMIN_API;
export const STEWARD_ACTION = o(401, 403, "allow", 403, "allow");
export const MEASURER_ACTION = o(401, "allow", "allow", 403, "allow");

export type PageRow = { kind: "page"; file: string; url: string; expect: Expect; note?: string };
export type RouteRow = { kind: "route"; file: string; method: string; url: string; expect: Expect; body?: unknown; note?: string };
export type ActionRow = {
  kind: "action";
  /** Path from the repository root, e.g. "app/(app)/admin/users/actions.ts". */
  file: string;
  name: string;
  expect: Expect;
  check?: (ctx: Ctx) => Promise<unknown>;
  covered?: string;
};
export type AccessRow = PageRow | RouteRow | ActionRow;

/** `file` is relative to app/. */
export const page = (file: string, url: string, expect: Expect, note?: string): PageRow => ({ kind: "page", file, url, expect, note });
/** `file` is relative to app/; `body` is sent as JSON. */
export const api = (method: string, file: string, url: string, expect: Expect, body?: unknown, note?: string): RouteRow => ({
  kind: "route",
  file,
  method,
  url,
  expect,
  body,
  note,
});
export const action = (file: string, name: string, expect: Expect, check?: (ctx: Ctx) => Promise<unknown>, covered?: string): ActionRow => ({
  kind: "action",
  file,
  name,
  expect,
  check,
  covered,
});

const NIL = "00000000-0000-4000-8000-000000000000";
const BAD_TOKEN = "not-a-real-link-token";
/** Input that passes no schema: a verb that checks authorisation first throws 401/403 before looking at it. */
const BAD = { notAField: true } as never;

export const ACCESS_TABLE: AccessRow[] = [
  // ── foundation ───────────────────────────────────────────────────────────────────────────────
  page("(public)/page.tsx", "/", EVERYONE),
  page("(public)/signin/page.tsx", "/signin", SIGNED_OUT_ONLY, "signed-in visitors go to their overview"),
  page("(public)/signin/check-email/page.tsx", "/signin/check-email", EVERYONE),
  page("(app)/dashboard/page.tsx", "/dashboard", SIGNED_IN),
  page("(app)/settings/page.tsx", "/settings", SIGNED_IN),
  api("GET", "api/health/route.ts", "/api/health", EVERYONE),
  api("POST", "api/v1/readings/route.ts", "/api/v1/readings", o(401, 401, 401, 401, 401), { readings: [] }, "station tokens only; a session is not a token"),
  api("GET", "api/auth/[...nextauth]/route.ts", "/api/auth/session", EVERYONE, undefined, "next-auth's own endpoints"),
  api("POST", "api/auth/[...nextauth]/route.ts", "/api/auth/_log", EVERYONE, {}, "next-auth's own endpoints (client log sink)"),
  action("app/(app)/settings/actions.ts", "updateProfile", SIGNED_IN_ACTION, undefined, "inline requireUser(ctx) before any write (source check below)"),
  action("app/(app)/settings/actions.ts", "changePassword", SIGNED_IN_ACTION, undefined, "inline requireUser(ctx) before any write (source check below)"),
  action("app/(app)/settings/actions.ts", "signOutEverywhere", SIGNED_IN_ACTION, undefined, "inline requireUser(ctx) before any write (source check below)"),

  // ── people and permissions (#7) ──────────────────────────────────────────────────────────────
  page("(app)/admin/page.tsx", "/admin", o("redirect", 403, 403, 403, "redirect"), "admins go on to /admin/users"),
  page("(app)/admin/users/page.tsx", "/admin/users", ADMIN_PAGE),
  page("(app)/admin/requests/page.tsx", "/admin/requests", ADMIN_PAGE),
  page("(app)/admin/sites/page.tsx", "/admin/sites", ADMIN_PAGE),
  page("(app)/admin/stations/page.tsx", "/admin/stations", ADMIN_PAGE),
  page("(app)/admin/audit/page.tsx", "/admin/audit", ADMIN_PAGE),
  page("(app)/approvals/page.tsx", "/approvals", STEWARD_PAGE),
  page("(app)/stations/new/page.tsx", "/stations/new", MEASURER_PAGE),
  page("(public)/join/page.tsx", "/join", EVERYONE),
  page("(public)/invite/[token]/page.tsx", `/invite/${BAD_TOKEN}`, EVERYONE, "a bad link shows the refusal page"),
  page("(public)/reset/page.tsx", "/reset", EVERYONE),
  page("(public)/reset/[token]/page.tsx", `/reset/${BAD_TOKEN}`, EVERYONE, "a bad link shows the refusal page"),
  page("(public)/confirm-email/[token]/page.tsx", `/confirm-email/${BAD_TOKEN}`, EVERYONE, "a bad link shows the refusal page"),
  api("GET", "api/v1/admin/audit.csv/route.ts", "/api/v1/admin/audit.csv", ADMIN_API),
  api("GET", "api/v1/admin/audit/route.ts", "/api/v1/admin/audit", ADMIN_API),
  api("GET", "api/v1/admin/users/route.ts", "/api/v1/admin/users", ADMIN_API),
  api("PATCH", "api/v1/admin/users/[id]/route.ts", `/api/v1/admin/users/${NIL}`, o(401, 403, 403, 403, 404), { role: "volunteer" }),
  api("POST", "api/v1/admin/invitations/route.ts", "/api/v1/admin/invitations", ADMIN_API, {}, "empty body: admins get 400"),
  action("app/(app)/admin/users/actions.ts", "inviteAction", ADMIN_ACTION, (ctx) => inviteUser({ ctx, input: BAD })),
  action("app/(app)/admin/users/actions.ts", "setRoleAction", ADMIN_ACTION, (ctx) => setUserRole({ ctx, input: BAD })),
  action("app/(app)/admin/users/actions.ts", "setStatusAction", ADMIN_ACTION, (ctx) => setUserStatus({ ctx, input: BAD })),
  action("app/(app)/admin/requests/actions.ts", "decideJoinAction", ADMIN_ACTION, (ctx) => decideJoinRequest({ ctx, input: BAD })),
  action("app/(app)/admin/sites/actions.ts", "addStewardAction", ADMIN_ACTION, (ctx) => addSiteSteward({ ctx, input: BAD })),
  action("app/(app)/admin/sites/actions.ts", "removeStewardAction", ADMIN_ACTION, (ctx) => removeSiteSteward({ ctx, input: BAD })),
  action("app/(app)/admin/stations/actions.ts", "retireStationAction", ADMIN_ACTION, (ctx) => retireStation({ ctx, input: BAD })),
  action("app/(app)/admin/stations/actions.ts", "transferStationAction", ADMIN_ACTION, (ctx) => transferStation({ ctx, input: BAD })),
  action("app/(app)/approvals/actions.ts", "decideStationAction", STEWARD_ACTION, (ctx) => decideStationApproval({ ctx, input: BAD })),
  action("app/(app)/stations/new/actions.ts", "registerStationAction", MEASURER_ACTION, (ctx) => registerStation({ ctx, input: BAD })),
  action("app/(public)/join/actions.ts", "joinAction", EVERYONE, (ctx) => requestToJoin({ ctx, input: BAD })),
  action("app/(public)/invite/[token]/actions.ts", "acceptInviteAction", EVERYONE, (ctx) => acceptInvitation({ ctx, input: BAD }), "the link is the authorisation"),
  action("app/(public)/reset/actions.ts", "requestResetAction", EVERYONE, (ctx) => requestPasswordReset({ ctx, input: BAD })),
  action("app/(public)/reset/[token]/actions.ts", "resetPasswordAction", EVERYONE, (ctx) => resetPassword({ ctx, input: BAD }), "the link is the authorisation"),
  action("app/(public)/confirm-email/[token]/actions.ts", "confirmEmailAction", EVERYONE, (ctx) => confirmEmailChange({ ctx, input: BAD }), "the link is the authorisation"),
  action("components/account/email-change-action.ts", "requestEmailChangeAction", SIGNED_IN_ACTION, (ctx) => requestEmailChange({ ctx, input: BAD })),
  // ── seeing the network (map, tiles, sites, converter) ───────────────────────────────────────
  page("(app)/map/page.tsx", "/map", SIGNED_IN),
  page("(app)/sites/page.tsx", "/sites", SIGNED_IN),
  page("(app)/sites/[slug]/page.tsx", "/sites/hollow-pine-reserve", SIGNED_IN),
  page("(app)/sites/[slug]/edit/page.tsx", "/sites/hollow-pine-reserve/edit", o("redirect", 403, "allow", 403, "allow"), "the demo steward keeps this site"),
  page("(public)/convert/page.tsx", "/convert", EVERYONE),
  page("(public)/s/[slug]/page.tsx", "/s/hollow-pine-reserve", EVERYONE, "a public site"),
  api("GET", "api/tiles/[z]/[x]/[y]/route.ts", "/api/tiles/6/12/24", EVERYONE),
  api("GET", "api/tiles/style.json/route.ts", "/api/tiles/style.json", EVERYONE),
  api("GET", "api/v1/convert/route.ts", "/api/v1/convert?mag=21.5", EVERYONE),
  api("GET", "api/v1/map/route.ts", "/api/v1/map", SIGNED_IN_API),
  api("GET", "api/v1/sites/[slug]/summary/route.ts", "/api/v1/sites/hollow-pine-reserve/summary", EVERYONE, undefined, "a public site"),
  api("GET", "api/v1/sites/[slug]/nights/route.ts", "/api/v1/sites/hollow-pine-reserve/nights", EVERYONE, undefined, "a public site"),
  api("GET", "api/v1/sites/[slug]/hours/route.ts", "/api/v1/sites/hollow-pine-reserve/hours?month=2026-06", EVERYONE, undefined, "a public site"),
  action("app/(app)/sites/[slug]/edit/actions.ts", "updateSiteAction", STEWARD_ACTION, (ctx) => updateSite({ ctx, input: { slug: "hollow-pine-reserve", changes: BAD } })),
  // ── alerts (#5) ──────────────────────────────────────────────────────────────────────────────
  page("(app)/alerts/page.tsx", "/alerts", STEWARD_PAGE),
  page("(app)/alerts/rules/page.tsx", "/alerts/rules", STEWARD_PAGE, "without ?site= it lists the sites the steward keeps"),
  page("(public)/settings/notifications/page.tsx", `/settings/notifications?token=${BAD_TOKEN}`, EVERYONE, "a bad link shows the refusal page; without a token it needs a session"),
  api("POST", "api/v1/notifications/unsubscribe/route.ts", `/api/v1/notifications/unsubscribe?token=${BAD_TOKEN}`, o(404, 404, 404, 404, 404), undefined, "one-click unsubscribe: the token is the authorisation"),
  action("app/(app)/alerts/actions.ts", "acknowledgeAlertAction", STEWARD_ACTION, (ctx) => acknowledgeAlert({ ctx, input: BAD })),
  action("app/(app)/alerts/actions.ts", "resolveAlertAction", STEWARD_ACTION, (ctx) => resolveAlert({ ctx, input: BAD })),
  action("app/(app)/alerts/rules/actions.ts", "saveRuleAction", STEWARD_ACTION, (ctx) => updateRule({ ctx, input: BAD })),
  action("app/(app)/alerts/rules/actions.ts", "createDefaultRulesAction", STEWARD_ACTION, (ctx) => createDefaultRules({ ctx, input: BAD })),
  action("app/(public)/settings/notifications/actions.ts", "saveMyNotificationsAction", SIGNED_IN_ACTION, (ctx) => updateMyNotificationSettings({ ctx, input: BAD })),
  action("app/(public)/settings/notifications/actions.ts", "saveNotificationsByTokenAction", EVERYONE, (ctx) => updateSettingsByToken({ ctx, input: BAD }), "the link is the authorisation"),

  // ── station pages, station read API, field surveys (#3, #4) ──────────────────────────────────
  page("(app)/stations/page.tsx", "/stations", SIGNED_IN, "lists only the caller's own and stewarded stations"),
  page("(app)/stations/[slug]/page.tsx", "/stations/hp-north-ridge", SIGNED_IN, "an approved station of a public site"),
  page("(app)/stations/[slug]/page.tsx", "/stations/mh-summit", o("redirect", "allow", 404, 404, "allow"), "private site: owner (volunteer) and admin only; steward@ stewards other sites"),
  page("(app)/surveys/page.tsx", "/surveys", MEASURER_PAGE),
  page("(app)/surveys/new/page.tsx", "/surveys/new", MEASURER_PAGE),
  page("(app)/surveys/[id]/page.tsx", `/surveys/${NIL}`, o("redirect", 404, 404, 404, 404), "only the author (or an admin) sees a survey"),
  api("GET", "api/v1/stations/[slug]/nights/route.ts", "/api/v1/stations/hp-north-ridge/nights?from=2026-01-01&to=2026-01-02", SIGNED_IN_API, undefined, "public site; a station token also works"),
  api("GET", "api/v1/stations/[slug]/nights/route.ts", "/api/v1/stations/mh-summit/nights?from=2026-01-01&to=2026-01-02", o(401, "allow", 404, 404, "allow"), undefined, "private site"),
  api("GET", "api/v1/stations/[slug]/nights.csv/route.ts", "/api/v1/stations/mh-summit/nights.csv?from=2026-01-01&to=2026-01-02", o(401, "allow", 404, 404, "allow"), undefined, "private site"),
  api("GET", "api/v1/stations/[slug]/readings/route.ts", "/api/v1/stations/mh-summit/readings?limit=1", o(401, "allow", 404, 404, "allow"), undefined, "private site"),
  api("GET", "api/v1/stations/[slug]/readings/route.ts", "/api/v1/stations/hp-north-ridge/readings?limit=1", SIGNED_IN_API, undefined, "public site"),
  action("app/(app)/stations/[slug]/actions.ts", "createTokenAction", o(401, 404, 404, 404, 404), (ctx) => import("@/lib/stations/tokens").then((m) => m.createToken({ ctx, input: { stationSlug: "no-such-station-0000", name: "x" } })), "unknown station: 404 for everyone signed in"),
  action("app/(app)/stations/[slug]/actions.ts", "revokeTokenAction", o(401, 404, 404, 404, 404), (ctx) => import("@/lib/stations/tokens").then((m) => m.revokeToken({ ctx, input: { stationSlug: "no-such-station-0000", tokenId: NIL } }))),
  action("app/(app)/stations/[slug]/actions.ts", "addCalibrationAction", o(401, 404, 404, 404, 404), (ctx) => import("@/lib/stations/calibrations").then((m) => m.addCalibration({ ctx, input: BAD }))),
  action("app/(app)/surveys/new/actions.ts", "createSurveyAction", MEASURER_ACTION, (ctx) => import("@/lib/surveys/service").then((m) => m.createSurvey({ ctx, input: BAD }))),
  // ── logger-file uploads (#3) ──────────────────────────────────────────────────────────────────
  page("(app)/uploads/page.tsx", "/uploads", MEASURER_PAGE, "lists only the caller's uploads and their stations' uploads"),
  page("(app)/uploads/new/page.tsx", "/uploads/new", MEASURER_PAGE),
  page("(app)/uploads/[id]/page.tsx", `/uploads/${NIL}`, o("redirect", 404, 404, 403, 404), "an upload is seen only by its station's managers"),
  api("POST", "api/v1/stations/[slug]/uploads/route.ts", "/api/v1/stations/no-such-station-0000/uploads", o(401, 404, 404, 404, 404), {}, "a station token of that station, or a session that manages it"),
  api("POST", "api/v1/stations/[slug]/uploads/preview/route.ts", "/api/v1/stations/no-such-station-0000/uploads/preview", o(401, 404, 404, 404, 404), {}),
  api("GET", "api/v1/uploads/[id]/route.ts", `/api/v1/uploads/${NIL}`, o(401, 404, 404, 404, 404)),
  api("POST", "api/v1/uploads/[id]/retry/route.ts", `/api/v1/uploads/${NIL}/retry`, o(401, 404, 404, 404, 404), {}),
  // ── evidence for hearings (#6): briefs, verification, exports, glow estimates ───────────────
  page("(app)/briefs/page.tsx", "/briefs", o("redirect", 403, "allow", "allow", "allow")),
  page("(app)/glow/page.tsx", "/glow", o("redirect", 403, "allow", "allow", "allow")),
  page("(public)/verify/[code]/page.tsx", "/verify/AAAAAAAAAA", o(404, 404, 404, 404, 404), "an unknown code; tests/integration/briefs.test.ts checks a real one signed out"),
  api("GET", "api/v1/briefs/route.ts", "/api/v1/briefs", o(401, 403, "allow", "allow", "allow"), undefined, "my briefs only"),
  api("POST", "api/v1/briefs/route.ts", "/api/v1/briefs", o(401, 403, "allow", "allow", "allow"), {}, "empty body: 400, nothing queued"),
  api("GET", "api/v1/briefs/[id]/pdf/route.ts", `/api/v1/briefs/${NIL}/pdf`, o(401, 404, 404, 404, 404), undefined, "owner or admin; briefs.test.ts checks another user's real brief"),
  api("POST", "api/v1/briefs/[id]/shares/route.ts", `/api/v1/briefs/${NIL}/shares`, o(401, 404, 404, 404, 404), {}),
  api("DELETE", "api/v1/briefs/[id]/shares/[shareId]/route.ts", `/api/v1/briefs/${NIL}/shares/${NIL}`, o(401, 404, 404, 404, 404)),
  api("GET", "api/v1/briefs/shared/[token]/route.ts", `/api/v1/briefs/shared/${BAD_TOKEN}`, o(404, 404, 404, 404, 404), undefined, "the link is the authorisation; unknown or revoked: 404"),
  api("GET", "api/v1/exports/nights.csv/route.ts", "/api/v1/exports/nights.csv?site=hollow-pine-reserve&from=2026-11-01&to=2026-11-02", EVERYONE, undefined, "a public site"),
  api("GET", "api/v1/exports/readings.csv/route.ts", "/api/v1/exports/readings.csv?station=hp-north-ridge&from=2026-11-01&to=2026-11-01", SIGNED_IN_API, undefined, "an approved station of a public site"),
  api("GET", "api/v1/exports/stations.geojson/route.ts", "/api/v1/exports/stations.geojson", EVERYONE, undefined, "each caller sees the stations it may see"),
  api("GET", "api/v1/exports/sites.geojson/route.ts", "/api/v1/exports/sites.geojson", EVERYONE, undefined, "each caller sees the sites it may see"),
  action("app/(app)/glow/actions.ts", "saveGlowEstimateAction", o(401, 403, "allow", "allow", "allow"), (ctx) => saveGlowEstimate({ ctx, input: BAD })),
  action("app/(app)/glow/actions.ts", "deleteGlowEstimateAction", o(401, 403, "allow", "allow", "allow"), (ctx) => deleteGlowEstimate({ ctx, input: { id: "not-an-id" } })),
];
