import nodemailer, { type Transporter } from "nodemailer";
import { env } from "@/lib/env";

const g = globalThis as unknown as { __nightmarkMail?: Transporter };

/** SMTP through nodemailer: the local SMTP fake in development and tests, a relay set by env in production. */
export function mailTransport(): Transporter {
  if (!g.__nightmarkMail) {
    const e = env();
    g.__nightmarkMail = nodemailer.createTransport({
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure: e.SMTP_SECURE,
      auth: e.SMTP_USER ? { user: e.SMTP_USER, pass: e.SMTP_PASS ?? "" } : undefined,
      // The fake speaks plain SMTP on loopback; a real relay negotiates STARTTLS.
      ignoreTLS: e.SMTP_HOST === "127.0.0.1" || e.SMTP_HOST === "localhost",
      connectionTimeout: 5_000,
      greetingTimeout: 5_000,
      socketTimeout: 10_000,
    });
  }
  return g.__nightmarkMail;
}

export type MailMessage = { to: string | string[]; subject: string; text: string; html: string; headers?: Record<string, string> };

export async function sendMail(msg: MailMessage) {
  return mailTransport().sendMail({ from: env().MAIL_FROM, ...msg });
}

export const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/** A plain, readable HTML wrapper shared by every e-mail the product sends. */
export function mailHtml(title: string, bodyHtml: string) {
  return `<!doctype html><html><body style="font-family:system-ui,sans-serif;background:#0b0e17;color:#dee2ec;padding:24px">
<div style="max-width:560px;margin:auto;background:#121724;border:1px solid #2d354c;border-radius:12px;padding:24px">
<h1 style="font-size:20px;margin:0 0 16px">${escapeHtml(title)}</h1>${bodyHtml}
<p style="color:#949cb2;font-size:12px;margin-top:24px">Nightmark — night-sky brightness for a volunteer network.</p></div></body></html>`;
}
