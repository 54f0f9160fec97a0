/**
 * People and permissions (#7): invitations, join requests, station approval, password reset,
 * e-mail change, suspension, the audit trail and its CSV export. Verbs behind server actions are
 * called directly against the real database; route handlers and pages over HTTP; e-mails are read
 * back from the SMTP fake.
 */
import { randomUUID } from "node:crypto";
import { and, desc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { auditLog, invitations, siteStewards, sites, stations, users, type Role } from "@/db/schema";
import type { Ctx, CurrentUser } from "@/lib/auth/guard";
import { hashPassword } from "@/lib/auth/password";
import { AppError } from "@/lib/errors";
import { confirmEmailChange, requestEmailChange } from "@/lib/people/email-change";
import { acceptInvitation, inviteUser } from "@/lib/people/invitations";
import { decideJoinRequest, listJoinRequests, requestToJoin } from "@/lib/people/join-requests";
import { requestPasswordReset, resetPassword } from "@/lib/people/password-reset";
import { addSiteSteward, removeSiteSteward } from "@/lib/people/site-stewards";
import { retireStation, transferStation } from "@/lib/people/stations-admin";
import { setUserRole } from "@/lib/people/users";
import { canSeeEmail } from "@/lib/people/visibility";
import { decideStationApproval, listPendingStations, registerStation } from "@/lib/stations/register";
import { extractLinks, waitForMessage } from "../helpers/mail";
import { anonymous, demoAccount, signInAs, signInAsRole, trySignIn, type SessionFetch } from "../helpers/session";

const db = getDb();
const since = new Date(Date.now() - 1000);
const PASSWORD = "a-long-test-password-7";
const uniqueEmail = (tag: string) => `p7-${tag}-${randomUUID().slice(0, 8)}@test.nightmark.example`;

async function ctxFor(email: string): Promise<Ctx & { user: CurrentUser }> {
  const [u] = await db.select({ id: users.id, email: users.email, name: users.name, role: users.role }).from(users).where(eq(users.email, email));
  if (!u) throw new Error(`no user ${email}`);
  return { user: u, db };
}

/** A fresh account straight in the database (for tests that are not about invitations). */
async function makeUser(role: Role, tag: string = role) {
  const email = uniqueEmail(tag);
  await db.insert(users).values({ email, name: `Test ${tag}`, role, passwordHash: await hashPassword(PASSWORD) });
  return ctxFor(email);
}

async function thrown(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error("expected the call to throw");
}

function linkIn(msg: { text: string; html: string }, path: string): { url: string; token: string } {
  const url = extractLinks(msg).find((l) => l.includes(path));
  if (!url) throw new Error(`no ${path} link in the e-mail`);
  return { url, token: decodeURIComponent(url.split(path)[1]!.split(/[?#]/)[0]!) };
}

async function lastAudit(action: string, entityId: string) {
  const [row] = await db
    .select()
    .from(auditLog)
    .where(and(eq(auditLog.action, action), eq(auditLog.entityId, entityId)))
    .orderBy(desc(auditLog.id))
    .limit(1);
  return row;
}

let admin: Ctx & { user: CurrentUser };
let steward: Ctx & { user: CurrentUser };
let steward2: Ctx & { user: CurrentUser };
let adminHttp: SessionFetch;
let hollowPine: { id: string; name: string };

beforeAll(async () => {
  admin = await ctxFor(demoAccount("admin").email);
  steward = await ctxFor("steward@demo.nightmark.example");
  steward2 = await ctxFor("steward2@demo.nightmark.example");
  adminHttp = await signInAsRole("admin");
  const [s] = await db.select({ id: sites.id, name: sites.name }).from(sites).where(eq(sites.slug, "hollow-pine-reserve"));
  hollowPine = s!;
});

describe("invitations", () => {
  it("invite over HTTP → e-mail → accept page → account with role and sites → sign in", async () => {
    const email = uniqueEmail("invite");
    const res = await adminHttp("/api/v1/admin/invitations", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ email, role: "steward", siteIds: [hollowPine.id] }),
    });
    expect(res.status).toBe(201);
    const msg = await waitForMessage({ to: email, subject: /invited to Nightmark/, since });
    expect(msg.text).toMatch(/as a steward/);
    expect(msg.html).toMatch(/Accept the invitation/);
    const { url, token } = linkIn(msg, "/invite/");

    const page = await anonymous()(url);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain("Welcome to Nightmark");
    expect(html).toContain(hollowPine.name);

    const r = await acceptInvitation({ ctx: { user: null, db }, input: { token, name: "Ivy Invitee", password: PASSWORD, confirm: PASSWORD } });
    expect(r).toMatchObject({ email, role: "steward" });
    const links = await db.select().from(siteStewards).where(eq(siteStewards.userId, r.userId));
    expect(links.map((l) => l.siteId)).toEqual([hollowPine.id]);
    expect((await lastAudit("user.create", r.userId))?.after).toMatchObject({ email, role: "steward", siteIds: [hollowPine.id] });

    const session = await signInAs(email, PASSWORD);
    const me = await (await session("/api/auth/session")).json();
    expect(me.user.email).toBe(email);

    // Reused: refused, with the message page.
    expect((await thrown(acceptInvitation({ ctx: { user: null, db }, input: { token, name: "Again", password: PASSWORD, confirm: PASSWORD } }))).code).toBe("link_used");
    expect(await (await anonymous()(url)).text()).toContain("This link was already used");
  });

  it("refuses tampered and expired invitation links with a clear page", async () => {
    const email = uniqueEmail("expire");
    const inv = await inviteUser({ ctx: admin, input: { email, role: "volunteer" } });
    const { token } = linkIn(await waitForMessage({ to: email, subject: /invited/, since }), "/invite/");

    const last = token.at(-1) === "A" ? "B" : "A";
    const tampered = token.slice(0, -1) + last;
    expect(await (await anonymous()(`/invite/${tampered}`)).text()).toContain("This link is not valid");
    expect((await thrown(acceptInvitation({ ctx: { user: null, db }, input: { token: tampered, name: "X", password: PASSWORD, confirm: PASSWORD } }))).code).toBe("link_invalid");
    // A reset link's token is not an invitation, even though it is well formed.
    expect(await (await anonymous()("/invite/garbage")).text()).toContain("This link is not valid");

    await db.update(invitations).set({ expiresAt: new Date(Date.now() - 60_000) }).where(eq(invitations.id, inv.id));
    expect(await (await anonymous()(`/invite/${token}`)).text()).toContain("This link has expired");
    expect((await thrown(acceptInvitation({ ctx: { user: null, db }, input: { token, name: "X", password: PASSWORD, confirm: PASSWORD } }))).code).toBe("link_expired");
  });

  it("refuses to invite an address that already has an account, and non-admins", async () => {
    expect((await thrown(inviteUser({ ctx: admin, input: { email: demoAccount("volunteer").email, role: "volunteer" } }))).status).toBe(409);
    expect((await thrown(inviteUser({ ctx: steward, input: { email: uniqueEmail("x"), role: "admin" } }))).status).toBe(403);
  });
});

describe("join requests", () => {
  it("ask to join → admins told → approve → invitation e-mail; decline → e-mail", async () => {
    const email = uniqueEmail("join");
    await requestToJoin({ ctx: { user: null, db }, input: { name: "Jo Joiner", email, message: "I have a meter on my roof." } });
    await waitForMessage({ to: demoAccount("admin").email, subject: /New request to join/, since });
    const pending = await listJoinRequests({ ctx: admin });
    const req = pending.find((r) => r.email === email)!;
    expect(req).toMatchObject({ name: "Jo Joiner", status: "pending" });
    // The same address asking twice does not duplicate the request.
    await requestToJoin({ ctx: { user: null, db }, input: { name: "Jo Joiner", email } });
    expect((await listJoinRequests({ ctx: admin })).filter((r) => r.email === email)).toHaveLength(1);

    await decideJoinRequest({ ctx: admin, input: { id: req.id, decision: "approve" } });
    const approved = await waitForMessage({ to: email, subject: /was approved/, since });
    const { token } = linkIn(approved, "/invite/");
    const page = await (await anonymous()(`/invite/${token}`)).text();
    expect(page).toContain("volunteer");
    expect((await thrown(decideJoinRequest({ ctx: admin, input: { id: req.id, decision: "decline" } }))).status).toBe(409);
    expect((await lastAudit("join_request.approve", (await db.select().from(invitations).where(eq(invitations.joinRequestId, req.id)))[0]!.id))?.after).toMatchObject({ status: "approved" });

    const email2 = uniqueEmail("decline");
    await requestToJoin({ ctx: { user: null, db }, input: { name: "Dee Cline", email: email2 } });
    const req2 = (await listJoinRequests({ ctx: admin })).find((r) => r.email === email2)!;
    await decideJoinRequest({ ctx: admin, input: { id: req2.id, decision: "decline", note: "We are full this season." } });
    const declined = await waitForMessage({ to: email2, subject: /^Your request to join Nightmark$/, since });
    expect(declined.text).toContain("We are full this season.");
    expect(extractLinks(declined).some((l) => l.includes("/invite/"))).toBe(false);
  });

  it("an existing member asking to join gets a reset link, and the answer is the same", async () => {
    const r = await requestToJoin({ ctx: { user: null, db }, input: { name: "Sena", email: demoAccount("volunteer").email } });
    expect(r).toEqual({ received: true });
  });
});

describe("stations inside a site", () => {
  it("inside → pending, stewards e-mailed → another site's steward sees 404 → steward approves", async () => {
    const vol = await makeUser("volunteer", "station");
    const st = await registerStation({
      ctx: vol,
      input: { name: "Test ridge meter", lat: 37.91, lon: -111.42, deviceDescription: "Zenith photometer", fieldOfViewDeg: 20 },
    });
    expect(st).toMatchObject({ approval: "pending", timeZone: "America/Denver", site: { id: hollowPine.id } });
    const mail = await waitForMessage({ to: steward.user.email, subject: /awaiting approval at Hollow Pine Reserve/, since });
    expect(mail.text).toContain("Test ridge meter");

    expect((await listPendingStations({ ctx: steward })).some((s) => s.id === st.id)).toBe(true);
    expect((await listPendingStations({ ctx: steward2 })).some((s) => s.id === st.id)).toBe(false);
    expect((await thrown(decideStationApproval({ ctx: steward2, input: { stationId: st.id, decision: "approve" } }))).status).toBe(404);
    expect((await thrown(decideStationApproval({ ctx: vol, input: { stationId: st.id, decision: "approve" } }))).status).toBe(403);

    // Privacy: the site's steward may see the volunteer's address; another steward and an advocate may not.
    expect(await canSeeEmail(steward, vol.user.id)).toBe(true);
    expect(await canSeeEmail(steward2, vol.user.id)).toBe(false);
    expect(await canSeeEmail(await ctxFor(demoAccount("advocate").email), vol.user.id)).toBe(false);
    expect(await canSeeEmail(admin, vol.user.id)).toBe(true);
    expect(await canSeeEmail({ user: null, db }, vol.user.id)).toBe(false);

    await decideStationApproval({ ctx: steward, input: { stationId: st.id, decision: "approve" } });
    const [row] = await db.select().from(stations).where(eq(stations.id, st.id));
    expect(row).toMatchObject({ approval: "approved", siteId: hollowPine.id });
    expect(await lastAudit("station.approve", st.id)).toMatchObject({ before: { approval: "pending" }, after: { approval: "approved" }, actorId: steward.user.id });
    await waitForMessage({ to: vol.user.email, subject: /Station approved/, since });
  });

  it("outside every site → no approval needed; bad input → field errors; advocates may not register", async () => {
    const vol = await makeUser("volunteer", "outside");
    const st = await registerStation({ ctx: vol, input: { name: "Backyard", lat: 35.2, lon: -111.65 } });
    expect(st).toMatchObject({ approval: "none", site: null, timeZone: "America/Phoenix" });
    await expect(registerStation({ ctx: vol, input: { name: "x", lat: 95, lon: 0, timeZone: "Mars/Olympus" } })).rejects.toMatchObject({
      issues: expect.arrayContaining([expect.objectContaining({ path: ["lat"] }), expect.objectContaining({ path: ["timeZone"] })]),
    });
    expect((await thrown(registerStation({ ctx: await ctxFor(demoAccount("advocate").email), input: { name: "Nope", lat: 0, lon: 0 } }))).status).toBe(403);
  });
});

describe("password reset", () => {
  it("request → e-mail → new password works, old does not, link single-use; unknown address same answer", async () => {
    const u = await makeUser("volunteer", "reset");
    await requestPasswordReset({ ctx: { user: null, db }, input: { email: u.user.email } });
    const { url, token } = linkIn(await waitForMessage({ to: u.user.email, subject: /Reset your Nightmark password/, since }), "/reset/");
    expect(await (await anonymous()(url)).text()).toContain("Choose a new password");

    const next = "another-long-password-8";
    await expect(resetPassword({ ctx: { user: null, db }, input: { token, password: next, confirm: "different-long-pw" } })).rejects.toMatchObject({
      issues: [expect.objectContaining({ path: ["confirm"] })],
    });
    await resetPassword({ ctx: { user: null, db }, input: { token, password: next, confirm: next } });
    expect((await trySignIn(u.user.email, PASSWORD)).ok).toBe(false);
    await signInAs(u.user.email, next);
    expect((await thrown(resetPassword({ ctx: { user: null, db }, input: { token, password: next, confirm: next } }))).code).toBe("link_used");
    expect(await (await anonymous()(url)).text()).toContain("This link was already used");
    expect(await (await anonymous()(`${url.slice(0, -2)}zz`)).text()).toContain("This link is not valid");

    expect(await requestPasswordReset({ ctx: { user: null, db }, input: { email: uniqueEmail("nobody") } })).toEqual({ sent: true });
  });
});

describe("e-mail change", () => {
  it("asks for the password, e-mails the new address (and tells the old), confirms once", async () => {
    const u = await makeUser("volunteer", "mailchange");
    const newEmail = uniqueEmail("newaddr");
    expect((await thrown(requestEmailChange({ ctx: u, input: { newEmail, password: "wrong-password" } }))).details).toMatchObject({ field: "password" });
    expect((await thrown(requestEmailChange({ ctx: u, input: { newEmail: demoAccount("admin").email, password: PASSWORD } }))).details).toMatchObject({ field: "newEmail" });
    await requestEmailChange({ ctx: u, input: { newEmail, password: PASSWORD } });
    await waitForMessage({ to: u.user.email, subject: /is changing/, since });
    const { url, token } = linkIn(await waitForMessage({ to: newEmail, subject: /Confirm your new Nightmark e-mail/, since }), "/confirm-email/");
    expect(await (await anonymous()(url)).text()).toContain(newEmail);

    await confirmEmailChange({ ctx: { user: null, db }, input: { token } });
    expect(await lastAudit("user.email_change", u.user.id)).toMatchObject({ before: { email: u.user.email }, after: { email: newEmail } });
    await signInAs(newEmail, PASSWORD);
    expect((await trySignIn(u.user.email, PASSWORD)).ok).toBe(false);
    expect((await thrown(confirmEmailChange({ ctx: { user: null, db }, input: { token } }))).code).toBe("link_used");
  });
});

describe("admin changes and the audit trail", () => {
  it("suspend over HTTP ends the sessions and refuses sign-in; unsuspend restores it", async () => {
    const u = await makeUser("volunteer", "suspend");
    const session = await signInAs(u.user.email, PASSWORD);
    expect((await session("/settings")).status).toBe(200);

    const res = await adminHttp(`/api/v1/admin/users/${u.user.id}`, {
      method: "PATCH",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ status: "suspended" }),
    });
    expect(res.status).toBe(200);
    expect((await session("/settings")).status).toBe(307);
    expect(await trySignIn(u.user.email, PASSWORD)).toMatchObject({ ok: false, error: "Suspended" });
    expect(await lastAudit("user.suspend", u.user.id)).toMatchObject({ before: { status: "active" }, after: { status: "suspended" }, actorId: admin.user.id });

    // A volunteer cannot do the same.
    const volunteer = await signInAsRole("volunteer");
    expect((await volunteer(`/api/v1/admin/users/${u.user.id}`, { method: "PATCH", headers: { "content-type": "application/json" }, body: '{"status":"active"}' })).status).toBe(403);

    await adminHttp(`/api/v1/admin/users/${u.user.id}`, { method: "PATCH", headers: { "content-type": "application/json" }, body: '{"status":"active"}' });
    await signInAs(u.user.email, PASSWORD);
  });

  it("role, steward and station changes record before and after", async () => {
    const u = await makeUser("volunteer", "roles");
    await setUserRole({ ctx: admin, input: { userId: u.user.id, role: "steward" } });
    expect(await lastAudit("user.role_change", u.user.id)).toMatchObject({ before: { role: "volunteer" }, after: { role: "steward" } });
    expect((await thrown(setUserRole({ ctx: admin, input: { userId: admin.user.id, role: "volunteer" } }))).status).toBe(400);

    const added = await addSiteSteward({ ctx: admin, input: { siteId: hollowPine.id, email: u.user.email } });
    expect(added.changed).toBe(true);
    const addEntry = await lastAudit("site.steward_add", hollowPine.id);
    expect((addEntry?.after as { stewardIds: string[] }).stewardIds).toContain(u.user.id);
    expect((addEntry?.before as { stewardIds: string[] }).stewardIds).not.toContain(u.user.id);
    await removeSiteSteward({ ctx: admin, input: { siteId: hollowPine.id, userId: u.user.id } });
    expect(((await lastAudit("site.steward_remove", hollowPine.id))?.after as { stewardIds: string[] }).stewardIds).not.toContain(u.user.id);
    const vol = await makeUser("volunteer", "notsteward");
    expect((await thrown(addSiteSteward({ ctx: admin, input: { siteId: hollowPine.id, email: vol.user.email } }))).details).toMatchObject({ field: "email" });

    const st = await registerStation({ ctx: vol, input: { name: "Transfer me", lat: 35.2, lon: -111.6 } });
    await transferStation({ ctx: admin, input: { stationId: st.id, newOwnerEmail: u.user.email } });
    expect(await lastAudit("station.transfer", st.id)).toMatchObject({ before: { ownerId: vol.user.id }, after: { ownerId: u.user.id } });
    await retireStation({ ctx: admin, input: { stationId: st.id } });
    expect(await lastAudit("station.retire", st.id)).toMatchObject({ before: { status: "active" }, after: { status: "retired" } });
    expect((await thrown(retireStation({ ctx: admin, input: { stationId: st.id } }))).status).toBe(409);
  });

  it("exports the filtered audit log as CSV (admins only) and pages it as JSON", async () => {
    const u = await makeUser("volunteer", "csv");
    await setUserRole({ ctx: admin, input: { userId: u.user.id, role: "advocate" } });
    const res = await adminHttp(`/api/v1/admin/audit.csv?entityType=user&action=user.role_change`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/text\/csv/);
    expect(res.headers.get("content-disposition")).toMatch(/attachment; filename="nightmark-audit-\d{4}-\d{2}-\d{2}\.csv"/);
    const csv = await res.text();
    const [header, ...lines] = csv.trim().split("\r\n");
    expect(header).toBe("id,at,actor_id,actor_email,action,entity_type,entity_id,before,after");
    const line = lines.find((l) => l.includes(u.user.id))!;
    expect(line).toContain(`user.role_change,user,${u.user.id},"{""role"":""volunteer""}","{""role"":""advocate""}"`);
    expect(line).toContain(demoAccount("admin").email);
    expect(lines.every((l) => l.includes(",user.role_change,user,"))).toBe(true);

    const json = await (await adminHttp(`/api/v1/admin/audit?entityType=user&pageSize=2`)).json();
    expect(json.entries).toHaveLength(2);
    expect(json.total).toBeGreaterThanOrEqual(2);
    const bad = await adminHttp(`/api/v1/admin/audit.csv?from=yesterday`);
    expect(bad.status).toBe(400);
    expect((await (await signInAsRole("steward"))("/api/v1/admin/audit.csv")).status).toBe(403);
  });
});
