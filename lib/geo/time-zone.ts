import tzlookup from "tz-lookup";

/** The IANA zone at a position, or null for an invalid position. Pure and usable in the browser. */
export function timeZoneAt(lat: number, lon: number): string | null {
  if (!Number.isFinite(lat) || !Number.isFinite(lon) || Math.abs(lat) > 90 || Math.abs(lon) > 180) return null;
  try {
    return tzlookup(lat, lon);
  } catch {
    return null;
  }
}

/** True for a zone name this runtime knows (Intl has the IANA database). */
export function isValidTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}
