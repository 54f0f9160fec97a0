import pkg from "../../package.json";

/** The Nightmark version printed in briefs and export headers (package.json). */
export const NIGHTMARK_VERSION: string = pkg.version;
