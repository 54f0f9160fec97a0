/**
 * The alert and digest e-mails: a plain-text part and an HTML part with the same content, a table
 * of the last nights, a link to the site page and an unsubscribe / settings link that works without
 * signing in (plus List-Unsubscribe headers, RFC 2369 and one-click RFC 8058). Pure.
 */
import type { AlertRuleKind } from "@/db/schema/alerts";
import { escapeHtml, mailHtml } from "@/lib/mail/transport";
import type { NightValue } from "@/lib/trends/site-trend";
import { RULE_LABELS } from "./rules";

export type BuiltMail = {
  subject: string;
  text: string;
  html: string;
  headers: Record<string, string>;
};

export function settingsLinks(appUrl: string, token: string) {
  const base = appUrl.replace(/\/$/, "");
  return {
    settings: `${base}/settings/notifications?token=${encodeURIComponent(token)}`,
    oneClick: `${base}/api/v1/notifications/unsubscribe?token=${encodeURIComponent(token)}`,
  };
}

function unsubscribeHeaders(appUrl: string, token: string): Record<string, string> {
  const l = settingsLinks(appUrl, token);
  return {
    "List-Unsubscribe": `<${l.oneClick}>`,
    "List-Unsubscribe-Post": "List-Unsubscribe=One-Click",
  };
}

const f2 = (v: number) => v.toFixed(2);

function nightsText(nights: NightValue[], targetMag: number): string {
  const lines = nights.map(
    (n) =>
      `  ${n.night}  ${f2(n.mag)}  ${n.mag >= targetMag ? "meets target" : `${f2(targetMag - n.mag)} below target`}`,
  );
  return [`  night       mag/arcsec²  (target ${f2(targetMag)})`, ...lines].join("\n");
}

function nightsHtml(nights: NightValue[], targetMag: number): string {
  const cell = "padding:4px 8px;border-bottom:1px solid #2d354c;text-align:left";
  const rows = nights
    .map(
      (n) =>
        `<tr><td style="${cell}">${escapeHtml(n.night)}</td><td style="${cell};font-family:monospace">${f2(n.mag)}</td><td style="${cell}">${
          n.mag >= targetMag ? "meets target" : `${f2(targetMag - n.mag)} below`
        }</td></tr>`,
    )
    .join("");
  return `<table style="border-collapse:collapse;font-size:14px;margin:12px 0"><caption style="text-align:left;padding-bottom:4px">Last nights (site value, target ${f2(
    targetMag,
  )} mag/arcsec²)</caption><thead><tr><th scope="col" style="${cell}">Night</th><th scope="col" style="${cell}">mag/arcsec²</th><th scope="col" style="${cell}">Against target</th></tr></thead><tbody>${rows}</tbody></table>`;
}

export type AlertMailInput = {
  appUrl: string;
  token: string;
  site: { name: string; slug: string; targetMag: number };
  kind: AlertRuleKind;
  stationName?: string | null;
  summary: string;
  since: string | null;
  lastNights: NightValue[];
};

export function alertSubject(
  site: { name: string },
  kind: AlertRuleKind,
  stationName?: string | null,
): string {
  return `Nightmark alert — ${site.name}: ${RULE_LABELS[kind].title.toLowerCase()}${stationName ? ` (${stationName})` : ""}`;
}

export function buildAlertMail(m: AlertMailInput): BuiltMail {
  const base = m.appUrl.replace(/\/$/, "");
  const siteUrl = `${base}/sites/${m.site.slug}`;
  const alertsUrl = `${base}/alerts`;
  const links = settingsLinks(m.appUrl, m.token);
  const title = RULE_LABELS[m.kind].title;
  const subject = alertSubject(m.site, m.kind, m.stationName);
  const text = [
    `${title} at ${m.site.name}${m.stationName ? `, station ${m.stationName}` : ""}.`,
    "",
    m.summary,
    m.since ? `Since: ${m.since}.` : "",
    "",
    "Magnitudes per square arcsecond: a bigger number is a darker sky; a negative change means brighter.",
    "",
    nightsText(m.lastNights, m.site.targetMag),
    "",
    `Site page: ${siteUrl}`,
    `Acknowledge or resolve: ${alertsUrl}`,
    "",
    `Notification settings or stop these e-mails (no sign-in needed): ${links.settings}`,
  ]
    .filter((l, i, a) => !(l === "" && a[i - 1] === ""))
    .join("\n");
  const html = mailHtml(
    `${title} at ${m.site.name}`,
    `<p>${m.stationName ? `Station <strong>${escapeHtml(m.stationName)}</strong>. ` : ""}${escapeHtml(m.summary)}</p>
${m.since ? `<p>Since: <strong>${escapeHtml(m.since)}</strong>.</p>` : ""}
<p style="color:#949cb2;font-size:13px">Magnitudes per square arcsecond: a bigger number is a darker sky; a negative change means brighter.</p>
${nightsHtml(m.lastNights, m.site.targetMag)}
<p><a style="color:#8fb4ff" href="${escapeHtml(siteUrl)}">Open the site page</a> · <a style="color:#8fb4ff" href="${escapeHtml(alertsUrl)}">Acknowledge or resolve</a></p>
<p style="font-size:12px;color:#949cb2"><a style="color:#949cb2" href="${escapeHtml(links.settings)}">Notification settings or stop these e-mails</a> (no sign-in needed).</p>`,
  );
  return { subject, text, html, headers: unsubscribeHeaders(m.appUrl, m.token) };
}

export type DigestSite = {
  name: string;
  slug: string;
  targetMag: number;
  nights: NightValue[];
  openAlerts: number;
};

export function buildDigestMail(m: {
  appUrl: string;
  token: string;
  weekOf: string;
  sites: DigestSite[];
}): BuiltMail {
  const base = m.appUrl.replace(/\/$/, "");
  const links = settingsLinks(m.appUrl, m.token);
  const subject = `Nightmark weekly digest — week of ${m.weekOf}`;
  const textParts: string[] = [`Your sites over the last 7 nights (week of ${m.weekOf}).`, ""];
  let htmlParts = "";
  for (const s of m.sites) {
    const below = s.nights.filter((n) => n.mag < s.targetMag).length;
    const line = `${s.name}: ${s.nights.length} nights with a value, ${below} below the target ${f2(s.targetMag)}; ${s.openAlerts} open alert${s.openAlerts === 1 ? "" : "s"}.`;
    textParts.push(
      line,
      s.nights.length ? nightsText(s.nights, s.targetMag) : "  (no usable nights)",
      `  ${base}/sites/${s.slug}`,
      "",
    );
    htmlParts += `<h2 style="font-size:16px;margin:16px 0 4px">${escapeHtml(s.name)}</h2><p>${escapeHtml(line)}</p>${
      s.nights.length ? nightsHtml(s.nights, s.targetMag) : "<p>No usable nights.</p>"
    }<p><a style="color:#8fb4ff" href="${escapeHtml(`${base}/sites/${s.slug}`)}">Open the site page</a></p>`;
  }
  textParts.push(`Notification settings or stop the digest (no sign-in needed): ${links.settings}`);
  const html = mailHtml(
    subject,
    `${htmlParts}<p style="font-size:12px;color:#949cb2"><a style="color:#949cb2" href="${escapeHtml(links.settings)}">Notification settings or stop the digest</a> (no sign-in needed).</p>`,
  );
  return {
    subject,
    text: textParts.join("\n"),
    html,
    headers: unsubscribeHeaders(m.appUrl, m.token),
  };
}
