import { createHash, randomBytes, timingSafeEqual } from "node:crypto";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import type { Db } from "@/db";
import { sites, stations, stationTokens } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { forbidden, notFound, unauthorized } from "@/lib/errors";
import { isSiteSteward, requireUser, type Ctx } from "@/lib/auth/guard";
import type { IngestStation } from "@/ingest/ingest";

const TOKEN_PREFIX = "nmk_";

/** 32 random bytes: a token that cannot be guessed, so a fast hash (SHA-256) is enough to store it. */
export function newTokenSecret(): string {
  return TOKEN_PREFIX + randomBytes(32).toString("base64url");
}

export const hashToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");

/** The part of a token shown in lists, so a person can tell tokens apart without seeing them. */
export const tokenDisplayPrefix = (token: string) => token.slice(0, TOKEN_PREFIX.length + 6);

/** Who may manage a station's tokens: its owner, a steward of its site, or an admin. */
export async function canManageStation(ctx: Ctx, station: { ownerId: string; siteId: string | null }) {
  const user = ctx.user;
  if (!user) return false;
  if (user.role === "admin" || station.ownerId === user.id) return true;
  return station.siteId ? isSiteSteward(ctx, station.siteId) : false;
}

async function stationForManager(ctx: Ctx, slug: string) {
  requireUser(ctx);
  const [st] = await ctx.db.select().from(stations).where(eq(stations.slug, slug)).limit(1);
  // Someone who may not manage the station learns nothing about it.
  if (!st || !(await canManageStation(ctx, st))) throw notFound("Station");
  return st;
}

export async function listTokens({ ctx, input }: { ctx: Ctx; input: { stationSlug: string } }) {
  const st = await stationForManager(ctx, input.stationSlug);
  return ctx.db
    .select({
      id: stationTokens.id,
      name: stationTokens.name,
      prefix: stationTokens.prefix,
      createdAt: stationTokens.createdAt,
      lastUsedAt: stationTokens.lastUsedAt,
      revokedAt: stationTokens.revokedAt,
    })
    .from(stationTokens)
    .where(eq(stationTokens.stationId, st.id))
    .orderBy(desc(stationTokens.createdAt));
}

/** Creates a token; the secret is returned this once and never again. */
export async function createToken({ ctx, input }: { ctx: Ctx; input: { stationSlug: string; name: string } }) {
  const st = await stationForManager(ctx, input.stationSlug);
  if (st.status === "retired") throw forbidden("This station is retired; it cannot get new tokens.");
  return issueToken(ctx.db, st.id, input.name, ctx.user?.id ?? null);
}

export async function issueToken(db: Db, stationId: string, name: string, actorId: string | null) {
  const secret = newTokenSecret();
  const [row] = await db
    .insert(stationTokens)
    .values({ stationId, name, prefix: tokenDisplayPrefix(secret), tokenHash: hashToken(secret), createdBy: actorId })
    .returning({ id: stationTokens.id, prefix: stationTokens.prefix, name: stationTokens.name });
  await recordAudit(db, { actorId, action: "token.create", entityType: "token", entityId: row!.id, after: { stationId, name, prefix: row!.prefix } });
  return { ...row!, token: secret };
}

export async function revokeToken({ ctx, input }: { ctx: Ctx; input: { stationSlug: string; tokenId: string } }) {
  const st = await stationForManager(ctx, input.stationSlug);
  const [row] = await ctx.db
    .update(stationTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(stationTokens.id, input.tokenId), eq(stationTokens.stationId, st.id), isNull(stationTokens.revokedAt)))
    .returning({ id: stationTokens.id, prefix: stationTokens.prefix });
  if (!row) throw notFound("Active token");
  await recordAudit(ctx.db, { actorId: ctx.user?.id ?? null, action: "token.revoke", entityType: "token", entityId: row.id, before: { revokedAt: null }, after: { revokedAt: new Date().toISOString() } });
  return row;
}

export type TokenPrincipal = { tokenId: string; station: IngestStation & { slug: string; siteId: string | null; ownerId: string } };

/**
 * Resolves `Authorization: Bearer <token>` to its station. 401 for a missing or unknown token,
 * 403 for a revoked token or a retired station. The secret is never logged.
 */
export async function authenticateToken(db: Db, authorization: string | null): Promise<TokenPrincipal> {
  const m = /^Bearer\s+(\S+)\s*$/i.exec(authorization ?? "");
  if (!m) throw unauthorized("Send the station token as 'Authorization: Bearer <token>'.");
  const token = m[1]!;
  const hash = hashToken(token);
  const [row] = await db
    .select({
      tokenId: stationTokens.id,
      tokenHash: stationTokens.tokenHash,
      revokedAt: stationTokens.revokedAt,
      id: stations.id,
      slug: stations.slug,
      lat: stations.lat,
      lon: stations.lon,
      timeZone: stations.timeZone,
      status: stations.status,
      siteId: stations.siteId,
      ownerId: stations.ownerId,
      sunMaxAltDeg: sites.sunMaxAltDeg,
      moonMaxAltDeg: sites.moonMaxAltDeg,
    })
    .from(stationTokens)
    .innerJoin(stations, eq(stations.id, stationTokens.stationId))
    .leftJoin(sites, eq(sites.id, stations.siteId))
    .where(eq(stationTokens.tokenHash, hash))
    .limit(1);
  // Compare in constant time as well, so the check does not leak through timing.
  if (!row || !timingSafeEqual(Buffer.from(row.tokenHash, "hex"), Buffer.from(hash, "hex")))
    throw unauthorized("This station token is not valid.");
  if (row.revokedAt) throw forbidden("This station token was revoked. Create a new one on the station's page.");
  if (row.status === "retired") throw forbidden("This station is retired and no longer takes readings.");
  // Record use at most once a minute, so a busy logger does not write on every request.
  await db
    .update(stationTokens)
    .set({ lastUsedAt: new Date() })
    .where(and(eq(stationTokens.id, row.tokenId), sql`(${stationTokens.lastUsedAt} is null or ${stationTokens.lastUsedAt} < now() - interval '1 minute')`));
  return {
    tokenId: row.tokenId,
    station: {
      id: row.id,
      slug: row.slug,
      lat: row.lat,
      lon: row.lon,
      timeZone: row.timeZone,
      siteId: row.siteId,
      ownerId: row.ownerId,
      thresholds: {
        ...(row.sunMaxAltDeg != null ? { sunMaxAltDeg: row.sunMaxAltDeg } : {}),
        ...(row.moonMaxAltDeg != null ? { moonMaxAltDeg: row.moonMaxAltDeg } : {}),
      },
    },
  };
}
