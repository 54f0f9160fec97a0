import { VectorTile } from "@mapbox/vector-tile";
import { PbfReader } from "pbf";
import { describe, expect, it } from "vitest";
import accounts from "../../db/seed/demo-accounts.json" with { type: "json" };
import { appUrl } from "../helpers/env";
import { DEMO_POINTS, tileFor } from "../helpers/tiles";

describe("GET /api/tiles/{z}/{x}/{y}", () => {
  for (let z = 4; z <= 12; z++) {
    it(`serves decodable vector tiles for the demo region at z${z}`, async () => {
      for (const [lon, lat] of DEMO_POINTS) {
        const { x, y } = tileFor(lon, lat, z);
        const res = await fetch(appUrl(`/api/tiles/${z}/${x}/${y}`));
        expect(res.status).toBe(200);
        expect(res.headers.get("content-type")).toBe("application/x-protobuf");
        expect(res.headers.get("cache-control")).toMatch(/max-age=\d+/);
        const buf = new Uint8Array(await res.arrayBuffer());
        expect(buf.length).toBeGreaterThan(0);
        const tile = new VectorTile(new PbfReader(buf));
        const names = Object.keys(tile.layers);
        // Every demo point is on land; the land layer is there at every zoom.
        expect(names).toContain("land");
        const land = tile.layers.land!;
        expect(land.length).toBeGreaterThan(0);
        expect(land.extent).toBe(4096);
        const f = land.feature(0);
        expect(f.type).toBe(3); // polygon
        expect(f.loadGeometry()[0]!.length).toBeGreaterThanOrEqual(4);
        if (z <= 7) expect(names).toContain("admin"); // state/county lines cross these larger tiles
      }
    });
  }

  it("answers 400 for a tile that cannot exist", async () => {
    const res = await fetch(appUrl("/api/tiles/3/9/1"));
    expect(res.status).toBe(400);
    expect((await res.json()).error.code).toBe("bad_request");
  });

  it("serves a style whose tile URL is absolute on the request's origin", async () => {
    const res = await fetch(appUrl("/api/tiles/style.json"));
    expect(res.status).toBe(200);
    const style = await res.json();
    expect(style.version).toBe(8);
    const url: string = style.sources.base.tiles[0];
    expect(url).toBe(`${new URL(appUrl("/")).origin}/api/tiles/{z}/{x}/{y}`);
    expect(style.glyphs).toBeUndefined();
  });
});

describe("GET /api/v1/convert", () => {
  it("converts a reading with convertAll's keys and sourced constants", async () => {
    const res = await fetch(appUrl("/api/v1/convert?mag=22"));
    expect(res.status).toBe(200);
    const b = await res.json();
    for (const k of ["luminanceCdM2", "luminanceMcdM2", "ratioToNatural", "artificialPercent", "nelm", "bortleApprox"]) expect(b).toHaveProperty(k);
    // DOMAIN.md worked value [calc], K = 1.08e5: 22.0 → 171.2 µcd/m².
    expect(b.luminanceCdM2 * 1e6).toBeCloseTo(171.2, 0);
    // DOMAIN.md NELM worked value [calc]: m = 22 → 6.63.
    expect(Math.abs(b.nelm - 6.63)).toBeLessThan(0.01);
    expect(b.bortleApprox.approximate).toBe(true);
    expect(b.constants.luminanceK.source).toMatch(/Allen/);
  });

  it("goes back from luminance and from NELM, and compares two readings", async () => {
    const lum = await (await fetch(appUrl("/api/v1/convert?luminanceCdM2=0.00043"))).json();
    expect(lum.magArcsec2).toBeCloseTo(21.0, 1); // DOMAIN.md: 21.0 → 430.0 µcd/m² [calc]
    const nelm = await (await fetch(appUrl("/api/v1/convert?nelm=5.49"))).json();
    expect(nelm.magArcsec2).toBeCloseTo(20.0, 1); // DOMAIN.md: m = 20 → NELM 5.49 [calc]
    const diff = await (await fetch(appUrl("/api/v1/convert?mag=21&mag2=18.5"))).json();
    expect(diff.difference.ratio).toBeCloseTo(10, 6); // Pogson: 2.5 mag = ×10 [calc]
  });

  it("answers 400 with a clear message for bad input", async () => {
    for (const q of ["", "?mag=dark", "?mag=40", "?nelm=9", "?mag=21&nelm=6", "?mag2=20"]) {
      const res = await fetch(appUrl(`/api/v1/convert${q}`));
      expect(res.status, q).toBe(400);
      const b = await res.json();
      expect(b.error.message.length).toBeGreaterThan(10);
    }
  });
});

describe("site visibility for signed-out visitors", () => {
  it("a private site's public page and JSON answer 404", async () => {
    expect((await fetch(appUrl("/s/marrow-hill-common"))).status).toBe(404);
    expect((await fetch(appUrl("/api/v1/sites/marrow-hill-common/summary"))).status).toBe(404);
  });

  it("a public site's summary has no personal data and rounds positions", async () => {
    const res = await fetch(appUrl("/api/v1/sites/hollow-pine-reserve/summary"));
    expect(res.status).toBe(200);
    const text = await res.text();
    for (const a of accounts) {
      expect(text).not.toContain(a.email);
      expect(text).not.toContain(a.name);
    }
    expect(text).not.toMatch(/owner/i);
    const b = JSON.parse(text);
    expect(b.mode).toBe("public");
    for (const s of b.stations) {
      expect(Math.abs(s.lat * 100 - Math.round(s.lat * 100))).toBeLessThan(1e-6);
      expect(s.positionRounded).toBe(true);
    }
  });

  it("the map route needs a signed-in user", async () => {
    expect((await fetch(appUrl("/api/v1/map"))).status).toBe(401);
  });
});
