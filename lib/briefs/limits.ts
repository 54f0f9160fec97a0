/** A render-brief job is retried this many times by pg-boss before the brief is marked failed. */
export const BRIEF_RETRY_LIMIT = 3;
/** The longest period one brief covers, days. */
export const MAX_BRIEF_DAYS = 3 * 366;
