declare module "tz-lookup" {
  /** IANA time zone at a latitude/longitude (degrees). Throws on out-of-range input. */
  export default function tzlookup(lat: number, lon: number): string;
}
