/**
 * Addresses of the test stack. `npm test` (scripts/stack.mjs test) sets these in the environment;
 * the defaults are the test ports it uses, so a runner started by hand against a running test
 * stack works too.
 */
export const testEnv = {
  APP_URL: process.env.APP_URL ?? "http://127.0.0.1:3100",
  DATABASE_URL: process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54339/nightmark_test",
  MAIL_INBOX_URL: process.env.MAIL_INBOX_URL ?? "http://127.0.0.1:2080",
  SMTP_HOST: process.env.SMTP_HOST ?? "127.0.0.1",
  SMTP_PORT: Number(process.env.SMTP_PORT ?? 2025),
  S3_ENDPOINT: process.env.S3_ENDPOINT ?? "http://127.0.0.1:4579",
  S3_BUCKET: process.env.S3_BUCKET ?? "nightmark-uploads",
  S3_ACCESS_KEY_ID: process.env.S3_ACCESS_KEY_ID ?? "S3RVER",
  S3_SECRET_ACCESS_KEY: process.env.S3_SECRET_ACCESS_KEY ?? "S3RVER",
  NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET ?? "nightmark-development-secret-change-me",
} as const;

export const { APP_URL, DATABASE_URL, MAIL_INBOX_URL, S3_ENDPOINT, S3_BUCKET } = testEnv;

/** An absolute URL on the app under test. */
export function appUrl(path = "/"): string {
  return new URL(path, APP_URL).toString();
}
