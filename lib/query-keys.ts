/** Every TanStack Query key in the app comes from here, so invalidation is by one name. */
export const queryKeys = {
  map: (filters: Record<string, string | undefined>) => ["map", filters] as const,
  site: (slug: string) => ["site", slug] as const,
  siteNights: (slug: string, params: Record<string, string | undefined>) => ["site", slug, "nights", params] as const,
  station: (slug: string) => ["station", slug] as const,
  stationNights: (slug: string, params: Record<string, string | undefined>) => ["station", slug, "nights", params] as const,
  stationReadings: (slug: string, params: Record<string, string | undefined>) => ["station", slug, "readings", params] as const,
  stationTokens: (slug: string) => ["station", slug, "tokens"] as const,
  myStations: () => ["me", "stations"] as const,
  upload: (id: string) => ["upload", id] as const,
  alerts: (filters: Record<string, string | undefined>) => ["alerts", filters] as const,
  briefs: () => ["briefs"] as const,
};
