import { z } from "zod";

/**
 * The one place that reads process.env. Defaults are the development stack that
 * `npm start` runs (scripts/stack.mjs); `npm test` passes its own ports.
 */
const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url().default("postgres://postgres@127.0.0.1:54329/nightmark"),
  APP_URL: z.string().url().default("http://127.0.0.1:3000"),
  NEXTAUTH_SECRET: z.string().min(16).default("nightmark-development-secret-change-me"),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().positive().default(1025),
  SMTP_SECURE: z
    .enum(["true", "false"])
    .default("false")
    .transform((v) => v === "true"),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().default("Nightmark <no-reply@nightmark.invalid>"),
  MAIL_INBOX_URL: z.string().url().default("http://127.0.0.1:1080"),
  S3_ENDPOINT: z.string().url().default("http://127.0.0.1:4569"),
  S3_REGION: z.string().default("us-east-1"),
  S3_BUCKET: z.string().default("nightmark-uploads"),
  S3_ACCESS_KEY_ID: z.string().default("S3RVER"),
  S3_SECRET_ACCESS_KEY: z.string().default("S3RVER"),
  /** Trust X-Forwarded-For for the client address (only behind a proxy that sets it; the test stack does). */
  TRUST_PROXY: z
    .enum(["true", "false"])
    .optional()
    .transform((v) => v === "true"),
  /** Secure cookies only when served over https (production behind TLS). */
  COOKIE_SECURE: z
    .enum(["true", "false"])
    .optional()
    .transform((v) => v === "true"),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (!cached) {
    const parsed = schema.safeParse(process.env);
    if (!parsed.success) {
      const where = parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ");
      throw new Error(`Invalid environment: ${where}`);
    }
    cached = parsed.data;
  }
  return cached;
}
