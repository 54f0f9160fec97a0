import { escapeHtml, mailHtml, sendMail } from "@/lib/mail/transport";

/** Every e-mail of the people-and-permissions feature: a plain-text part and an HTML part saying the same. */

const link = (url: string, label: string) => `<p><a style="color:#84a6ff" href="${escapeHtml(url)}">${escapeHtml(label)}</a></p>`;
const para = (s: string) => `<p>${escapeHtml(s)}</p>`;
const quiet = (s: string) => `<p style="color:#949cb2">${escapeHtml(s)}</p>`;
const fmt = (d: Date) => d.toUTCString().replace("GMT", "UTC");

export async function sendInvitationMail(p: { to: string; url: string; role: string; inviter: string | null; expiresAt: Date }) {
  const subject = "You are invited to Nightmark";
  const intro = `${p.inviter ?? "An admin"} invited you to Nightmark as a ${p.role}.`;
  const text = `${intro}\n\nSet your name and password with this link (it works once, until ${fmt(p.expiresAt)}):\n\n${p.url}\n\nIf you did not expect this, ignore the message.`;
  const html = mailHtml(subject, para(intro) + para(`The link works once, until ${fmt(p.expiresAt)}.`) + link(p.url, "Accept the invitation") + quiet("If you did not expect this, ignore the message."));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendJoinApprovedMail(p: { to: string; name: string; url: string; expiresAt: Date }) {
  const subject = "Your request to join Nightmark was approved";
  const text = `Hello ${p.name},\n\nyour request to join Nightmark as a volunteer was approved. Set your password with this link (it works once, until ${fmt(p.expiresAt)}):\n\n${p.url}\n`;
  const html = mailHtml(subject, para(`Hello ${p.name},`) + para("your request to join Nightmark as a volunteer was approved.") + para(`The link works once, until ${fmt(p.expiresAt)}.`) + link(p.url, "Set your password"));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendJoinDeclinedMail(p: { to: string; name: string; note?: string }) {
  const subject = "Your request to join Nightmark";
  const body = "Thank you for your interest. The network's admins could not approve your request to join at this time.";
  const text = `Hello ${p.name},\n\n${body}${p.note ? `\n\nTheir note: ${p.note}` : ""}\n`;
  const html = mailHtml(subject, para(`Hello ${p.name},`) + para(body) + (p.note ? para(`Their note: ${p.note}`) : ""));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendJoinRequestToAdmins(p: { to: string[]; name: string; email: string; url: string }) {
  if (p.to.length === 0) return;
  const subject = "New request to join Nightmark";
  const text = `${p.name} <${p.email}> asks to join as a volunteer. Approve or decline:\n\n${p.url}\n`;
  const html = mailHtml(subject, para(`${p.name} <${p.email}> asks to join as a volunteer.`) + link(p.url, "Review join requests"));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendAlreadyMemberMail(p: { to: string; resetUrl: string }) {
  const subject = "You already have a Nightmark account";
  const text = `Someone asked to join Nightmark with this address, but it already has an account. If you forgot your password, reset it here:\n\n${p.resetUrl}\n`;
  const html = mailHtml(subject, para("Someone asked to join Nightmark with this address, but it already has an account.") + link(p.resetUrl, "Reset your password"));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendResetMail(p: { to: string; url: string; expiresAt: Date }) {
  const subject = "Reset your Nightmark password";
  const text = `Choose a new password with this link (it works once, until ${fmt(p.expiresAt)}):\n\n${p.url}\n\nIf you did not ask for it, ignore this message: your password stays as it is.`;
  const html = mailHtml(subject, para(`The link works once, until ${fmt(p.expiresAt)}.`) + link(p.url, "Choose a new password") + quiet("If you did not ask for it, ignore this message: your password stays as it is."));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendEmailChangeMail(p: { to: string; url: string; expiresAt: Date }) {
  const subject = "Confirm your new Nightmark e-mail address";
  const text = `Confirm that Nightmark should use this address for your account (the link works once, until ${fmt(p.expiresAt)}):\n\n${p.url}\n`;
  const html = mailHtml(subject, para("Confirm that Nightmark should use this address for your account.") + para(`The link works once, until ${fmt(p.expiresAt)}.`) + link(p.url, "Confirm this address"));
  await sendMail({ to: p.to, subject, text, html });
}

export async function sendEmailChangeNotice(p: { to: string; newEmail: string }) {
  const subject = "Your Nightmark e-mail address is changing";
  const body = `Someone signed in to your account asked to change its e-mail address to ${p.newEmail}. It changes once the new address is confirmed. If this was not you, change your password and tell an admin.`;
  await sendMail({ to: p.to, subject, text: body, html: mailHtml(subject, para(body)) });
}

export async function sendStationPendingMail(p: { to: string[]; stationName: string; siteName: string; ownerName: string; url: string }) {
  if (p.to.length === 0) return;
  const subject = `Station awaiting approval at ${p.siteName}`;
  const body = `${p.ownerName} registered the station "${p.stationName}" inside ${p.siteName}. Its readings are kept; they count toward the site once a steward approves the station.`;
  const text = `${body}\n\nApprove or decline:\n\n${p.url}\n`;
  await sendMail({ to: p.to, subject, text, html: mailHtml(subject, para(body) + link(p.url, "Review stations awaiting approval")) });
}

export async function sendStationDecisionMail(p: { to: string; stationName: string; siteName: string; approved: boolean }) {
  const subject = `Station ${p.approved ? "approved" : "declined"} at ${p.siteName}`;
  const body = p.approved
    ? `A steward of ${p.siteName} approved your station "${p.stationName}". Its readings now count toward the site.`
    : `A steward of ${p.siteName} declined your station "${p.stationName}" for the site. The station and its readings stay yours; they do not count toward the site.`;
  await sendMail({ to: p.to, subject, text: body, html: mailHtml(subject, para(body)) });
}
