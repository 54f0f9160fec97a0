import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { eq } from "drizzle-orm";
import type { NextAuthOptions } from "next-auth";
import type { Adapter } from "next-auth/adapters";
import CredentialsProvider from "next-auth/providers/credentials";
import EmailProvider from "next-auth/providers/email";
import { getDb } from "@/db";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { escapeHtml, mailHtml, sendMail } from "@/lib/mail/transport";
import { verifyPassword } from "./password";
import { consumeSignIn, resetSignIn } from "./rate-limit";

/** After this many wrong passwords in a row the account is locked for LOCK_MINUTES. */
export const MAX_FAILED_SIGN_INS = 5;
export const LOCK_MINUTES = 15;

/** Messages shown on the sign-in page, keyed by the `error` query parameter next-auth sets. */
export const SIGN_IN_MESSAGES: Record<string, string> = {
  UnknownAccount: "No Nightmark account uses this e-mail address. Ask an admin for an invitation, or ask to join.",
  WrongPassword: "That password is not right for this account. Check it, or sign in with an e-mailed link.",
  Locked: `This account is locked for ${LOCK_MINUTES} minutes after ${MAX_FAILED_SIGN_INS} wrong passwords. Use an e-mailed link, or wait.`,
  Suspended: "This account is suspended. Contact an admin of your network.",
  RateLimited: "Too many sign-in attempts. Wait a few minutes and try again.",
  Verification: "That sign-in link has expired or was already used. Ask for a new one below.",
  EmailSignin: "The sign-in e-mail could not be sent. Try again in a moment.",
  CredentialsSignin: "E-mail or password not accepted.",
  SessionRequired: "Please sign in to see that page.",
  Default: "Sign-in did not work. Try again.",
};

class SignInError extends Error {
  constructor(code: keyof typeof SIGN_IN_MESSAGES) {
    // next-auth forwards the message as ?error=<message>; we send the code and look it up.
    super(code);
  }
}

function clientIp(headers: Record<string, string | string[] | undefined> | undefined): string {
  // A client can send any X-Forwarded-For; only a proxy in front of us may be believed.
  if (!env().TRUST_PROXY) return "direct";
  const h = headers ?? {};
  const fwd = h["x-forwarded-for"];
  const first = Array.isArray(fwd) ? fwd[0] : fwd;
  return (first?.split(",")[0] ?? "local").trim();
}

export function authOptions(): NextAuthOptions {
  const db = getDb();
  const e = env();
  return {
    secret: e.NEXTAUTH_SECRET,
    session: { strategy: "jwt", maxAge: 30 * 24 * 3600 },
    adapter: DrizzleAdapter(db, {
      usersTable: users,
      accountsTable: accounts,
      sessionsTable: sessions,
      verificationTokensTable: verificationTokens,
    }) as unknown as Adapter,
    pages: { signIn: "/signin", error: "/signin", verifyRequest: "/signin/check-email" },
    useSecureCookies: e.COOKIE_SECURE,
    providers: [
      CredentialsProvider({
        id: "password",
        name: "E-mail and password",
        credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
        async authorize(credentials, req) {
          const email = String(credentials?.email ?? "").trim().toLowerCase();
          const password = String(credentials?.password ?? "");
          if (!email || !password) throw new SignInError("CredentialsSignin");
          try {
            await consumeSignIn(email, clientIp(req?.headers as Record<string, string>));
          } catch (err) {
            if (err instanceof AppError && err.status === 429) throw new SignInError("RateLimited");
            throw err;
          }
          const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
          if (!user) throw new SignInError("UnknownAccount");
          if (user.status === "suspended") throw new SignInError("Suspended");
          if (user.lockedUntil && user.lockedUntil > new Date()) throw new SignInError("Locked");
          const ok = user.passwordHash ? await verifyPassword(password, user.passwordHash) : false;
          if (!ok) {
            const failed = user.failedSignIns + 1;
            const lock = failed >= MAX_FAILED_SIGN_INS;
            await db
              .update(users)
              .set({
                failedSignIns: lock ? 0 : failed,
                lockedUntil: lock ? new Date(Date.now() + LOCK_MINUTES * 60_000) : user.lockedUntil,
              })
              .where(eq(users.id, user.id));
            throw new SignInError(lock ? "Locked" : "WrongPassword");
          }
          await db.update(users).set({ failedSignIns: 0, lockedUntil: null }).where(eq(users.id, user.id));
          await resetSignIn(email);
          return { id: user.id, email: user.email, name: user.name };
        },
      }),
      EmailProvider({
        maxAge: 15 * 60,
        from: e.MAIL_FROM,
        server: { host: e.SMTP_HOST, port: e.SMTP_PORT },
        async sendVerificationRequest({ identifier, url }) {
          const text = `Sign in to Nightmark with this link (it works once, for 15 minutes):\n\n${url}\n\nIf you did not ask for it, ignore this message.`;
          const html = mailHtml(
            "Your Nightmark sign-in link",
            `<p>Use this link to sign in. It works once, for 15 minutes.</p><p><a style="color:#84a6ff" href="${escapeHtml(url)}">Sign in to Nightmark</a></p><p style="color:#949cb2">If you did not ask for it, ignore this message.</p>`,
          );
          await sendMail({ to: identifier, subject: "Your Nightmark sign-in link", text, html });
        },
      }),
    ],
    callbacks: {
      async signIn({ user, account }) {
        if (account?.provider === "email") {
          // Magic links only for existing, active accounts: no self-registration through this door.
          const [u] = await db.select().from(users).where(eq(users.email, String(user.email).toLowerCase())).limit(1);
          if (!u) return "/signin?error=UnknownAccount";
          if (u.status === "suspended") return "/signin?error=Suspended";
        }
        return true;
      },
      async jwt({ token, user }) {
        if (user) {
          const [u] = await db.select({ epoch: users.sessionEpoch }).from(users).where(eq(users.id, user.id)).limit(1);
          token.sub = user.id;
          token.epoch = u?.epoch ?? 0;
        }
        return token;
      },
      async session({ session, token }) {
        if (session.user) Object.assign(session.user, { id: token.sub, epoch: token.epoch ?? 0 });
        return session;
      },
    },
  };
}
