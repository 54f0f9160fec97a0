import { MAIL_INBOX_URL } from "./env";

/** A message as kept by scripts/smtp-fake.mjs. */
export interface MailMessage {
  id: string;
  from: string;
  to: string[];
  subject: string;
  /** ISO time the fake received it. */
  date: string;
  text: string;
  html: string;
}

/** All messages, newest first. */
export async function listMessages(): Promise<MailMessage[]> {
  const res = await fetch(`${MAIL_INBOX_URL}/api/messages`, { cache: "no-store" });
  if (!res.ok) throw new Error(`mail inbox answered ${res.status}`);
  return (await res.json()) as MailMessage[];
}

export async function getMessage(id: string): Promise<MailMessage> {
  const res = await fetch(`${MAIL_INBOX_URL}/api/messages/${encodeURIComponent(id)}`, { cache: "no-store" });
  if (!res.ok) throw new Error(`mail inbox answered ${res.status} for ${id}`);
  return (await res.json()) as MailMessage;
}

export async function clearInbox(): Promise<void> {
  const res = await fetch(`${MAIL_INBOX_URL}/api/messages`, { method: "DELETE" });
  if (!res.ok) throw new Error(`mail inbox answered ${res.status} to DELETE`);
}

export interface WaitForMessageOptions {
  /** Recipient address (case-insensitive). */
  to: string;
  subject?: RegExp;
  /** Only messages received at or after this time. */
  since?: Date;
  timeoutMs?: number;
}

/** Polls the inbox until a matching message arrives; returns the newest match. */
export async function waitForMessage({
  to,
  subject,
  since,
  timeoutMs = 15_000,
}: WaitForMessageOptions): Promise<MailMessage> {
  const want = to.toLowerCase();
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = (await listMessages()).find(
      (m) =>
        m.to.some((a) => a.toLowerCase() === want) &&
        (!subject || subject.test(m.subject)) &&
        (!since || new Date(m.date).getTime() >= since.getTime()),
    );
    if (found) return found;
    if (Date.now() > deadline) {
      throw new Error(`no mail to ${to}${subject ? ` matching ${subject}` : ""} within ${timeoutMs} ms`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** Links (http/https) in a message, text part first, then HTML hrefs. */
export function extractLinks(message: Pick<MailMessage, "text" | "html">): string[] {
  const links = new Set<string>();
  for (const m of message.text.matchAll(/https?:\/\/[^\s<>"')\]]+/g)) links.add(m[0]);
  for (const m of message.html.matchAll(/href="(https?:\/\/[^"]+)"/g)) links.add(m[1]!.replace(/&amp;/g, "&"));
  return [...links];
}
