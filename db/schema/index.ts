export * from "./auth";
export * from "./sites";
export * from "./stations";
export * from "./readings";
export * from "./audit";
export * from "./meta";
export * from "./people";
