/**
 * The demo scenario: an invented volunteer network. Every site, person and station here is made
 * up; positions are plausible spots in the western United States so that the map's finer boundary
 * data covers them. The readings model that goes with it is in db/seed/model.ts.
 *
 * Three sites tell three stories:
 * - Hollow Pine Reserve: the dark control. Natural sky, no trend.
 * - Cedar Basin Park: a growing town nearby; its clear-sky brightness grows by about 0.1 mag a year
 *   (about 10 % a year, the pace of the 2011–2022 naked-eye reports; the airglow cycle masks part of it).
 * - Marrow Hill Common: a new lit car park switched on mid-year, a sudden step of about 0.4 mag.
 */

export type ScenarioSite = {
  slug: string;
  name: string;
  description: string;
  timeZone: string;
  targetMag: number;
  isPublic: boolean;
  lightingZone: "E0" | "E1" | "E2" | "E3" | "E4";
  centre: [number, number]; // [lon, lat]
  /** Polygon half-sizes in degrees [lon, lat], drawn as an irregular octagon around the centre. */
  radius: [number, number];
  stewards: string[]; // e-mails from demo-accounts.json
};

export type ScenarioStation = {
  slug: string;
  name: string;
  site: string | null;
  owner: string;
  lon: number;
  lat: number;
  elevationM: number;
  device: string;
  /** Readings model parameters (db/seed/model.ts). null = newly registered, no readings yet. */
  model: null | {
    baseMag: number;
    brighteningMagPerYear: number;
    step?: { fromDaysAgo: number; deltaMag: number };
    calibrationOffsetMag?: number;
  };
};

export const SCENARIO_SITES: ScenarioSite[] = [
  {
    slug: "hollow-pine-reserve",
    name: "Hollow Pine Reserve",
    description: "High desert reserve far from any town; the network's dark control site.",
    timeZone: "America/Denver",
    targetMag: 21.6,
    isPublic: true,
    lightingZone: "E0",
    centre: [-111.42, 37.91],
    radius: [0.14, 0.1],
    stewards: ["steward@demo.nightmark.example"],
  },
  {
    slug: "cedar-basin-park",
    name: "Cedar Basin Park",
    description: "County park on a basin floor, 25 km from a fast-growing town.",
    timeZone: "America/Phoenix",
    targetMag: 21.3,
    isPublic: true,
    lightingZone: "E1",
    centre: [-111.78, 34.62],
    radius: [0.1, 0.08],
    stewards: ["steward@demo.nightmark.example"],
  },
  {
    slug: "marrow-hill-common",
    name: "Marrow Hill Common",
    description: "Hilltop common land at the edge of a valley town; a new lit car park opened nearby this year.",
    timeZone: "America/Los_Angeles",
    targetMag: 20.8,
    isPublic: false,
    lightingZone: "E2",
    centre: [-122.04, 40.62],
    radius: [0.06, 0.05],
    stewards: ["steward2@demo.nightmark.example"],
  },
];

const V1 = "volunteer@demo.nightmark.example";
const V2 = "volunteer2@demo.nightmark.example";
const DEVICE = "Zenith photometer, 20° field of view, weatherproof housing";

export const SCENARIO_STATIONS: ScenarioStation[] = [
  { slug: "hp-north-ridge", name: "North Ridge", site: "hollow-pine-reserve", owner: V1, lon: -111.45, lat: 37.96, elevationM: 2410, device: DEVICE, model: { baseMag: 21.82, brighteningMagPerYear: 0 } },
  { slug: "hp-juniper-flat", name: "Juniper Flat", site: "hollow-pine-reserve", owner: V1, lon: -111.38, lat: 37.89, elevationM: 2280, device: DEVICE, model: { baseMag: 21.78, brighteningMagPerYear: 0, calibrationOffsetMag: 0.04 } },
  { slug: "hp-ranger-post", name: "Ranger Post", site: "hollow-pine-reserve", owner: V2, lon: -111.47, lat: 37.88, elevationM: 2190, device: DEVICE, model: { baseMag: 21.74, brighteningMagPerYear: 0 } },
  { slug: "hp-east-mesa", name: "East Mesa", site: "hollow-pine-reserve", owner: V2, lon: -111.33, lat: 37.93, elevationM: 2350, device: DEVICE, model: { baseMag: 21.8, brighteningMagPerYear: 0 } },
  { slug: "cb-visitor-centre", name: "Visitor Centre", site: "cedar-basin-park", owner: V1, lon: -111.8, lat: 34.63, elevationM: 1480, device: DEVICE, model: { baseMag: 21.2, brighteningMagPerYear: -0.11 } },
  { slug: "cb-dry-wash", name: "Dry Wash", site: "cedar-basin-park", owner: V1, lon: -111.74, lat: 34.6, elevationM: 1430, device: DEVICE, model: { baseMag: 21.35, brighteningMagPerYear: -0.1 } },
  { slug: "cb-south-gate", name: "South Gate", site: "cedar-basin-park", owner: V2, lon: -111.81, lat: 34.57, elevationM: 1410, device: DEVICE, model: { baseMag: 21.05, brighteningMagPerYear: -0.12 } },
  { slug: "cb-overlook", name: "Overlook", site: "cedar-basin-park", owner: V2, lon: -111.72, lat: 34.66, elevationM: 1560, device: DEVICE, model: { baseMag: 21.4, brighteningMagPerYear: -0.09 } },
  { slug: "mh-summit", name: "Summit", site: "marrow-hill-common", owner: V1, lon: -122.05, lat: 40.63, elevationM: 620, device: DEVICE, model: { baseMag: 20.9, brighteningMagPerYear: 0, step: { fromDaysAgo: 120, deltaMag: -0.45 } } },
  { slug: "mh-old-orchard", name: "Old Orchard", site: "marrow-hill-common", owner: V2, lon: -122.01, lat: 40.6, elevationM: 540, device: DEVICE, model: { baseMag: 20.7, brighteningMagPerYear: 0, step: { fromDaysAgo: 120, deltaMag: -0.38 } } },
  { slug: "mh-stone-wall", name: "Stone Wall", site: "marrow-hill-common", owner: V1, lon: -122.07, lat: 40.61, elevationM: 580, device: DEVICE, model: { baseMag: 20.85, brighteningMagPerYear: 0, step: { fromDaysAgo: 120, deltaMag: -0.42 } } },
  { slug: "backyard-new-meter", name: "Backyard meter (new)", site: null, owner: V1, lon: -111.65, lat: 35.2, elevationM: 2100, device: "Zenith photometer, just unboxed", model: null },
];

/** An irregular octagon, closed, counter-clockwise, as GeoJSON wants for an outer ring. */
export function sitePolygon(site: ScenarioSite): GeoJSON.Polygon {
  const [lon0, lat0] = site.centre;
  const [rx, ry] = site.radius;
  const wobble = [1, 0.86, 1.08, 0.9, 1.02, 0.8, 1.1, 0.92];
  const ring: [number, number][] = wobble.map((w, i) => {
    const a = (i / wobble.length) * 2 * Math.PI;
    return [+(lon0 + rx * w * Math.cos(a)).toFixed(5), +(lat0 + ry * w * Math.sin(a)).toFixed(5)];
  });
  ring.push(ring[0]!);
  return { type: "Polygon", coordinates: [ring] };
}
