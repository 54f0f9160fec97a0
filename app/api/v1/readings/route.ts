import { NextResponse } from "next/server";
import { getDb } from "@/db";
import { consumeToken } from "@/lib/auth/rate-limit";
import { unsupportedMediaType } from "@/lib/errors";
import { mediaType, readBodyText } from "@/lib/http/body";
import { route } from "@/lib/http/respond";
import { authenticateToken } from "@/lib/stations/tokens";
import { storeReadings } from "@/ingest/ingest";
import { itemsFromCsv, itemsFromJson, MAX_POST_BYTES } from "@/ingest/post-body";
import { validateItems } from "@/ingest/validate";

export const dynamic = "force-dynamic";

/**
 * POST /api/v1/readings — a station's logger sends a batch of readings with its token.
 * 200 {accepted, duplicates, rejected:[{index, reason}]}; errors as {"error":{code, message}}.
 */
export const POST = route(async (req: Request) => {
  const db = getDb();
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  // Refuse an oversize body before even looking at the token or reading it.
  if (Number.isFinite(declared) && declared > MAX_POST_BYTES) await readBodyText(req, MAX_POST_BYTES);
  const principal = await authenticateToken(db, req.headers.get("authorization"));
  await consumeToken(principal.tokenId);
  const type = mediaType(req);
  if (type !== "application/json" && type !== "text/csv")
    throw unsupportedMediaType(`Content-Type ${type || "(none)"} is not accepted; send application/json or text/csv.`);
  const text = await readBodyText(req, MAX_POST_BYTES);
  const items = type === "application/json" ? itemsFromJson(text) : itemsFromCsv(text);
  const { valid, rejected } = validateItems(items);
  const stored = await storeReadings(principal.station, valid, { source: "post" });
  return NextResponse.json({ accepted: stored.accepted, duplicates: stored.duplicates, rejected });
});
