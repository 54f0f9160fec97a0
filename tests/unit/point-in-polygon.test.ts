import type { MultiPolygon, Polygon } from "geojson";
import { describe, expect, it } from "vitest";
import { pointInPolygon, pointInRing } from "@/lib/geo/point-in-polygon";
import { sitePolygon, SCENARIO_SITES } from "@/db/seed/scenario";

const square: Polygon = { type: "Polygon", coordinates: [[[0, 0], [10, 0], [10, 10], [0, 10], [0, 0]]] };
const withHole: Polygon = {
  type: "Polygon",
  coordinates: [
    [[0, 0], [10, 0], [10, 10], [0, 10], [0, 0]],
    [[4, 4], [6, 4], [6, 6], [4, 6], [4, 4]],
  ],
};

describe("pointInPolygon", () => {
  it("inside, outside, and the edges and corners of a square", () => {
    expect(pointInPolygon(5, 5, square)).toBe(true);
    expect(pointInPolygon(11, 5, square)).toBe(false);
    expect(pointInPolygon(-0.001, 5, square)).toBe(false);
    expect(pointInPolygon(0, 5, square)).toBe(true); // on an edge counts as inside
    expect(pointInPolygon(10, 10, square)).toBe(true); // a corner
    expect(pointInPolygon(5, 10.000001, square)).toBe(false);
  });

  it("a point level with a vertex is not counted twice", () => {
    const diamond: Polygon = { type: "Polygon", coordinates: [[[0, -1], [1, 0], [0, 1], [-1, 0], [0, -1]]] };
    expect(pointInPolygon(-2, 0, diamond)).toBe(false);
    expect(pointInPolygon(0, 0, diamond)).toBe(true);
    expect(pointInPolygon(0.9, 0.9, diamond)).toBe(false);
  });

  it("holes are outside, their edges are on the boundary", () => {
    expect(pointInPolygon(5, 5, withHole)).toBe(false);
    expect(pointInPolygon(2, 2, withHole)).toBe(true);
    expect(pointInPolygon(4, 5, withHole)).toBe(true);
  });

  it("concave rings (a U shape)", () => {
    const u: Polygon = { type: "Polygon", coordinates: [[[0, 0], [3, 0], [3, 3], [2, 3], [2, 1], [1, 1], [1, 3], [0, 3], [0, 0]]] };
    expect(pointInPolygon(1.5, 2, u)).toBe(false); // in the notch
    expect(pointInPolygon(0.5, 2, u)).toBe(true);
    expect(pointInPolygon(2.5, 2, u)).toBe(true);
  });

  it("multipolygons: inside any part", () => {
    const mp: MultiPolygon = { type: "MultiPolygon", coordinates: [square.coordinates, [[[20, 20], [30, 20], [30, 30], [20, 20]]]] };
    expect(pointInPolygon(5, 5, mp)).toBe(true);
    expect(pointInPolygon(28, 22, mp)).toBe(true);
    expect(pointInPolygon(15, 15, mp)).toBe(false);
  });

  it("ring orientation does not matter, and an unclosed ring works", () => {
    const cw = [[0, 0], [0, 10], [10, 10], [10, 0]];
    expect(pointInRing(5, 5, cw)).toBe(true);
    expect(pointInRing(15, 5, cw)).toBe(false);
  });

  it("the demo sites contain their centres and not a point far outside", () => {
    for (const s of SCENARIO_SITES) {
      const poly = sitePolygon(s);
      expect(pointInPolygon(s.centre[0], s.centre[1], poly)).toBe(true);
      expect(pointInPolygon(s.centre[0] + s.radius[0] * 1.5, s.centre[1], poly)).toBe(false);
    }
  });

  it("real-world coordinates: negative longitudes (western hemisphere)", () => {
    const box: Polygon = { type: "Polygon", coordinates: [[[-111.6, 37.8], [-111.2, 37.8], [-111.2, 38.0], [-111.6, 38.0], [-111.6, 37.8]]] };
    expect(pointInPolygon(-111.42, 37.91, box)).toBe(true);
    expect(pointInPolygon(-111.1, 37.91, box)).toBe(false);
  });
});
