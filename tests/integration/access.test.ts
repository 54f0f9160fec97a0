import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { users } from "@/db/schema";
import type { Ctx, CurrentUser } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { anonymous, demoAccount, signInAsRole, type SessionFetch } from "../helpers/session";
import { ACCESS_TABLE, WHO, type ActionRow, type Outcome, type PageRow, type RouteRow, type Who } from "./access-table";

const ROOT = join(__dirname, "..", "..");
const APP = join(ROOT, "app");

function walk(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) walk(p, out);
    else out.push(p);
  }
  return out;
}

const appFiles = walk(APP).map((p) => relative(APP, p).split("\\").join("/"));
const pageFiles = appFiles.filter((f) => /(^|\/)page\.tsx?$/.test(f));
const routeFiles = appFiles.filter((f) => /(^|\/)route\.tsx?$/.test(f));
const HTTP_METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE", "HEAD", "OPTIONS"];

function routeMethods(file: string): string[] {
  const src = readFileSync(join(APP, file), "utf8");
  const found = new Set<string>();
  for (const m of src.matchAll(/export\s+(?:const|async\s+function|function)\s+([A-Z]+)\b/g)) found.add(m[1]!);
  for (const m of src.matchAll(/export\s*\{([^}]*)\}/g)) for (const part of m[1]!.split(",")) found.add(part.trim().split(/\s+as\s+/).pop()!.trim());
  return [...found].filter((m) => HTTP_METHODS.includes(m));
}

/** "use server" files in app/ and components/, with their exported functions and each one's source. */
function actionExports(): { file: string; name: string; body: string }[] {
  const files = [...walk(APP), ...walk(join(ROOT, "components"))].filter((p) => /\.tsx?$/.test(p));
  const out: { file: string; name: string; body: string }[] = [];
  for (const p of files) {
    const src = readFileSync(p, "utf8");
    if (!/^\s*(\/\/[^\n]*\n\s*)*["']use server["']/.test(src)) continue;
    const file = relative(ROOT, p).split("\\").join("/");
    const re = /export\s+(?:async\s+function\s+(\w+)|const\s+(\w+)\s*=\s*async)/g;
    const hits = [...src.matchAll(re)];
    hits.forEach((m, i) => out.push({ file, name: (m[1] ?? m[2])!, body: src.slice(m.index, hits[i + 1]?.index ?? src.length) }));
  }
  return out;
}

const pages = ACCESS_TABLE.filter((r): r is PageRow => r.kind === "page");
const routes = ACCESS_TABLE.filter((r): r is RouteRow => r.kind === "route");
const actions = ACCESS_TABLE.filter((r): r is ActionRow => r.kind === "action");

describe("the access table covers the whole app", () => {
  it("has a row for every page.tsx", () => {
    const missing = pageFiles.filter((f) => !pages.some((r) => r.file === f));
    expect(missing, `add page(...) rows to tests/integration/access-table.ts for:\n${missing.join("\n")}`).toEqual([]);
  });
  it("has a row for every method of every route.ts", () => {
    const missing = routeFiles.flatMap((f) => routeMethods(f).filter((m) => !routes.some((r) => r.file === f && r.method === m)).map((m) => `${m} ${f}`));
    expect(missing, `add api(...) rows to tests/integration/access-table.ts for:\n${missing.join("\n")}`).toEqual([]);
  });
  it("has a row for every exported server action", () => {
    const missing = actionExports().filter((a) => !actions.some((r) => r.file === a.file && r.name === a.name));
    expect(missing.map((a) => `${a.file}#${a.name}`), "add action(...) rows to tests/integration/access-table.ts").toEqual([]);
  });
  it("has no rows for files or actions that no longer exist", () => {
    const exported = actionExports();
    const stale = [
      ...pages.filter((r) => !pageFiles.includes(r.file)).map((r) => r.file),
      ...routes.filter((r) => !routeFiles.includes(r.file)).map((r) => r.file),
      ...actions.filter((r) => !exported.some((a) => a.file === r.file && a.name === r.name)).map((r) => `${r.file}#${r.name}`),
    ];
    expect(stale).toEqual([]);
  });
  it("every action row says how it is checked, and every guarded action calls a guard helper", () => {
    for (const a of actionExports()) {
      const row = actions.find((r) => r.file === a.file && r.name === a.name);
      if (!row) continue;
      expect(row.check || row.covered, `${a.file}#${a.name}: give check or covered`).toBeTruthy();
      const isPublic = WHO.every((w) => row.expect[w] === "allow");
      if (!isPublic) expect(a.body, `${a.file}#${a.name} must call a guard helper`).toMatch(/require(User|Role|SiteSteward)\(/);
    }
  });
});

const sessions = {} as Record<Who, SessionFetch>;
const ctxs = {} as Record<Who, Ctx>;

beforeAll(async () => {
  sessions.signedOut = anonymous();
  ctxs.signedOut = { user: null, db: getDb() };
  for (const role of ["volunteer", "steward", "advocate", "admin"] as const) {
    sessions[role] = await signInAsRole(role);
    const [u] = await getDb()
      .select({ id: users.id, email: users.email, name: users.name, role: users.role })
      .from(users)
      .where(eq(users.email, demoAccount(role).email));
    ctxs[role] = { user: u as CurrentUser, db: getDb() };
  }
});

function classify(status: number): Outcome | `other ${number}` {
  if (status >= 300 && status < 400) return "redirect";
  if (status === 401 || status === 403 || status === 404) return status;
  if (status < 300 || status === 400 || status === 409 || status === 422) return "allow";
  return `other ${status}`;
}

const cases = <R extends { expect: Record<Who, Outcome> }>(rows: R[]) => rows.flatMap((r) => WHO.map((who) => ({ r, who, want: r.expect[who] })));

describe("pages", () => {
  it.each(cases(pages).map((c) => [`${c.r.url} as ${c.who} → ${c.want}`, c] as const))("%s", async (_n, { r, who, want }) => {
    const res = await sessions[who](r.url);
    expect(classify(res.status)).toBe(want);
    if (want === "redirect" && who === "signedOut") expect(res.headers.get("location") ?? "").toMatch(/\/signin/);
  });
});

describe("route handlers", () => {
  it.each(cases(routes).map((c) => [`${c.r.method} ${c.r.url} as ${c.who} → ${c.want}`, c] as const))("%s", async (_n, { r, who, want }) => {
    const init: RequestInit = { method: r.method };
    if (r.body !== undefined) {
      init.body = JSON.stringify(r.body);
      init.headers = { "content-type": "application/json" };
    }
    const res = await sessions[who](r.url, init);
    expect(classify(res.status)).toBe(want);
    if (res.status === 401 || res.status === 403) {
      const body = (await res.json()) as { error?: { code?: string } };
      expect(body.error?.code).toBe(res.status === 401 ? "unauthorized" : "forbidden");
    }
  });
});

describe("server actions (their lib/ verbs, with a ctx per role)", () => {
  const withCheck = actions.filter((a) => a.check);
  it.each(cases(withCheck).map((c) => [`${c.r.file}#${c.r.name} as ${c.who} → ${c.want}`, c] as const))("%s", async (_n, { r, who, want }) => {
    let got: Outcome | string = "allow";
    try {
      await r.check!(ctxs[who]);
    } catch (err) {
      got = err instanceof AppError && [401, 403, 404].includes(err.status) ? (err.status as Outcome) : "allow";
    }
    expect(got).toBe(want);
  });
});
