import { z } from "zod";
import { ROLES } from "@/db/schema";

/** Shared by server actions, route handlers and (through react-hook-form) the client forms. */
export const emailField = z.string().trim().toLowerCase().email("Enter a valid e-mail address.").max(254);
export const nameField = z.string().trim().min(1, "Enter your name.").max(80, "At most 80 characters.");
export const passwordField = z.string().min(10, "Use at least 10 characters.").max(200, "At most 200 characters.");
export const roleField = z.enum(ROLES, { message: "Choose a role." });
export const uuidField = z.string().uuid("Not a valid id.");

export const newPasswordSchema = z
  .object({ password: passwordField, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export const inviteSchema = z.object({
  email: emailField,
  role: roleField,
  siteIds: z.array(uuidField).max(50).default([]),
});

export const acceptInviteSchema = z
  .object({ token: z.string().min(1).max(200), name: nameField, password: passwordField, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export const joinSchema = z.object({
  name: nameField,
  email: emailField,
  message: z.string().trim().max(1000, "At most 1,000 characters.").default(""),
});

export const decideJoinSchema = z.object({
  id: uuidField,
  decision: z.enum(["approve", "decline"]),
  note: z.string().trim().max(500).default(""),
});

export const resetRequestSchema = z.object({ email: emailField });
export const resetSchema = z
  .object({ token: z.string().min(1).max(200), password: passwordField, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export const emailChangeSchema = z.object({
  newEmail: emailField,
  password: z.string().max(200).default(""),
});
export const tokenSchema = z.object({ token: z.string().min(1).max(200) });

export const userSearchSchema = z.object({
  q: z.string().trim().max(100).default(""),
  role: z.enum([...ROLES, ""]).default(""),
  status: z.enum(["active", "suspended", ""]).default(""),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
});
export const setRoleSchema = z.object({ userId: uuidField, role: roleField });
export const setStatusSchema = z.object({ userId: uuidField, status: z.enum(["active", "suspended"]) });

export const stewardSchema = z.object({ siteId: uuidField, email: emailField });
export const removeStewardSchema = z.object({ siteId: uuidField, userId: uuidField });

export const stationIdSchema = z.object({ stationId: uuidField });
export const transferSchema = z.object({ stationId: uuidField, newOwnerEmail: emailField });
export const stationSearchSchema = z.object({
  q: z.string().trim().max(100).default(""),
  status: z.enum(["active", "retired", ""]).default(""),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
});

const dateField = z
  .string()
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use YYYY-MM-DD.")
  .or(z.literal(""))
  .default("");
export const auditQuerySchema = z.object({
  actor: z.string().trim().max(254).default(""),
  entityType: z.string().trim().max(40).default(""),
  action: z.string().trim().max(80).default(""),
  from: dateField,
  to: dateField,
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;
