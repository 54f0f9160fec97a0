import { describe, expect, it } from "vitest";
import { appUrl } from "../helpers/env";

describe("GET /api/health", () => {
  it("answers ok with the database up", async () => {
    const res = await fetch(appUrl("/api/health"), { cache: "no-store" });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/application\/json/);
    const body = await res.json();
    expect(body).toMatchObject({ status: "ok", database: "up" });
  });
});
