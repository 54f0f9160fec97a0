#!/usr/bin/env node
// Local mail fake for Nightmark: an SMTP server that accepts every message (no auth, no TLS)
// and a small HTTP inbox to read them. Loopback only.
//
//   node scripts/smtp-fake.mjs [--smtp-port 1025] [--web-port 1080] [--dir .nightmark/mail-dev]
//   env: SMTP_PORT, MAIL_WEB_PORT, MAIL_DIR
//
// HTTP: GET /                 HTML inbox
//       GET /api/messages     JSON array, newest first: {id, from, to[], subject, date, text, html}
//       GET /api/messages/:id one message
//       DELETE /api/messages  clear everything (memory and disk)
import { createServer } from "node:http";
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { randomUUID } from "node:crypto";
import { createRequire } from "node:module";

// smtp-server's ESM build imports a nodemailer directory (fails under Node's ESM resolver);
// its CommonJS build works, so load both packages through require.
const require = createRequire(import.meta.url);
const { SMTPServer } = require("smtp-server");
const { simpleParser } = require("mailparser");

const HOST = "127.0.0.1";

function arg(name) {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] : undefined;
}

const smtpPort = Number(arg("smtp-port") ?? process.env.SMTP_PORT ?? 1025);
const webPort = Number(arg("web-port") ?? process.env.MAIL_WEB_PORT ?? 1080);
const dir = resolve(arg("dir") ?? process.env.MAIL_DIR ?? ".nightmark/mail-dev");

mkdirSync(dir, { recursive: true });

/** @type {Array<{id:string, from:string, to:string[], subject:string, date:string, text:string, html:string}>} */
let messages = [];

function load() {
  for (const f of readdirSync(dir)) {
    if (!f.endsWith(".json")) continue;
    try {
      messages.push(JSON.parse(readFileSync(join(dir, f), "utf8")));
    } catch {
      // a half-written file from a crash: ignore it
    }
  }
  sortMessages();
}

function sortMessages() {
  messages.sort((a, b) => (a.date < b.date ? 1 : a.date > b.date ? -1 : b.seq - a.seq));
}

let seq = 0;

function addressList(field) {
  if (!field) return [];
  const list = Array.isArray(field) ? field : [field];
  return list.flatMap((a) => (a.value ?? []).map((v) => v.address).filter(Boolean));
}

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS", "AUTH"],
  banner: "Nightmark mail fake",
  size: 25 * 1024 * 1024,
  logger: false,
  onData(stream, session, callback) {
    simpleParser(stream)
      .then((parsed) => {
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
        const headerTo = [...addressList(parsed.to), ...addressList(parsed.cc)];
        const to = [...new Set([...headerTo, ...envelopeTo])];
        const msg = {
          id: randomUUID(),
          seq: Date.now() * 1000 + (seq++ % 1000),
          from: parsed.from?.text ?? session.envelope.mailFrom?.address ?? "",
          to,
          subject: parsed.subject ?? "",
          // receive time, so "newest first" follows arrival order
          date: new Date().toISOString(),
          sentDate: parsed.date ? parsed.date.toISOString() : null,
          text: parsed.text ?? "",
          html: typeof parsed.html === "string" ? parsed.html : "",
          headers: Object.fromEntries(
            [...parsed.headers].map(([k, v]) => [k, typeof v === "string" ? v : JSON.stringify(v)]),
          ),
        };
        messages.push(msg);
        sortMessages();
        const file = `${msg.date.replace(/[:.]/g, "-")}-${msg.id}.json`;
        writeFileSync(join(dir, file), JSON.stringify(msg, null, 2));
        console.log(`[mail] ${msg.date} ${msg.from} -> ${to.join(", ")}: ${msg.subject}`);
        callback();
      })
      .catch((err) => {
        console.error("[mail] parse failed", err);
        callback(err);
      });
  },
});
smtp.on("error", (err) => console.error("[mail] smtp error", err.message));

function publicView(m) {
  return { id: m.id, from: m.from, to: m.to, subject: m.subject, date: m.date, text: m.text, html: m.html };
}

function send(res, status, body, type = "application/json; charset=utf-8") {
  const data = typeof body === "string" ? body : JSON.stringify(body);
  res.writeHead(status, { "content-type": type, "cache-control": "no-store" });
  res.end(data);
}

const INBOX_HTML = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Nightmark mail inbox</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>
  :root { color-scheme: dark; }
  body { margin: 0; font: 14px/1.4 system-ui, sans-serif; background: #0b1020; color: #dbe2f0; display: flex; height: 100vh; }
  #list { width: 360px; border-right: 1px solid #25304a; overflow-y: auto; }
  #list header { padding: 12px; display: flex; justify-content: space-between; align-items: center; border-bottom: 1px solid #25304a; }
  h1 { font-size: 15px; margin: 0; }
  button { background: #1b2540; color: #dbe2f0; border: 1px solid #34446a; border-radius: 4px; padding: 4px 10px; cursor: pointer; }
  .item { padding: 10px 12px; border-bottom: 1px solid #1a2338; cursor: pointer; }
  .item:hover, .item.sel { background: #16203a; }
  .item .s { font-weight: 600; }
  .item .m { color: #8d9ab8; font-size: 12px; }
  #view { flex: 1; display: flex; flex-direction: column; min-width: 0; }
  #meta { padding: 12px; border-bottom: 1px solid #25304a; }
  #meta .m { color: #8d9ab8; }
  #tabs { padding: 8px 12px; display: flex; gap: 8px; }
  #text { white-space: pre-wrap; padding: 12px; margin: 0; overflow: auto; flex: 1; font-family: ui-monospace, monospace; }
  iframe { flex: 1; border: 0; background: #fff; }
  .empty { padding: 24px; color: #8d9ab8; }
</style></head>
<body>
<section id="list"><header><h1>Nightmark inbox</h1><span><button id="refresh">Refresh</button> <button id="clear">Clear</button></span></header><div id="items"></div></section>
<section id="view"><div class="empty">Select a message.</div></section>
<script>
const items = document.getElementById("items");
const view = document.getElementById("view");
let current = null, mode = "html";
function esc(s) { return String(s).replace(/[&<>"']/g, c => ({"&":"&amp;","<":"&lt;",">":"&gt;","\\"":"&quot;","'":"&#39;"}[c])); }
async function load() {
  const list = await (await fetch("/api/messages")).json();
  if (!list.length) { items.innerHTML = '<div class="empty">No messages.</div>'; return; }
  items.innerHTML = list.map(m => '<div class="item' + (current && current.id === m.id ? ' sel' : '') + '" data-id="' + m.id + '"><div class="s">' + esc(m.subject || "(no subject)") + '</div><div class="m">' + esc(m.to.join(", ")) + '</div><div class="m">' + esc(new Date(m.date).toLocaleString()) + '</div></div>').join("");
}
function render() {
  const m = current;
  view.innerHTML = '<div id="meta"><div><b>' + esc(m.subject || "(no subject)") + '</b></div><div class="m">From: ' + esc(m.from) + '</div><div class="m">To: ' + esc(m.to.join(", ")) + '</div><div class="m">' + esc(new Date(m.date).toLocaleString()) + '</div></div>' +
    '<div id="tabs"><button data-mode="html"' + (m.html ? '' : ' disabled') + '>HTML</button><button data-mode="text">Text</button></div>';
  if (mode === "html" && m.html) {
    const f = document.createElement("iframe");
    f.setAttribute("sandbox", "");
    f.srcdoc = m.html;
    view.appendChild(f);
  } else {
    const pre = document.createElement("pre");
    pre.id = "text"; pre.textContent = m.text;
    view.appendChild(pre);
  }
}
items.addEventListener("click", async e => {
  const el = e.target.closest(".item"); if (!el) return;
  current = await (await fetch("/api/messages/" + el.dataset.id)).json();
  mode = current.html ? "html" : "text";
  render(); load();
});
view.addEventListener("click", e => { const b = e.target.closest("button[data-mode]"); if (b) { mode = b.dataset.mode; render(); } });
document.getElementById("refresh").onclick = load;
document.getElementById("clear").onclick = async () => { await fetch("/api/messages", { method: "DELETE" }); current = null; view.innerHTML = '<div class="empty">Select a message.</div>'; load(); };
load(); setInterval(load, 3000);
</script>
</body></html>`;

const web = createServer((req, res) => {
  const url = new URL(req.url ?? "/", `http://${HOST}`);
  const path = url.pathname.replace(/\/+$/, "") || "/";
  if (req.method === "GET" && path === "/") return send(res, 200, INBOX_HTML, "text/html; charset=utf-8");
  if (req.method === "GET" && path === "/api/messages") return send(res, 200, messages.map(publicView));
  if (req.method === "DELETE" && path === "/api/messages") {
    messages = [];
    for (const f of readdirSync(dir)) if (f.endsWith(".json")) rmSync(join(dir, f), { force: true });
    return send(res, 200, { ok: true });
  }
  const m = /^\/api\/messages\/([^/]+)$/.exec(path);
  if (m && req.method === "GET") {
    const msg = messages.find((x) => x.id === decodeURIComponent(m[1]));
    return msg ? send(res, 200, publicView(msg)) : send(res, 404, { error: "not found" });
  }
  if (m && req.method === "DELETE") {
    const id = decodeURIComponent(m[1]);
    messages = messages.filter((x) => x.id !== id);
    for (const f of readdirSync(dir)) if (f.endsWith(`${id}.json`)) rmSync(join(dir, f), { force: true });
    return send(res, 200, { ok: true });
  }
  if (req.method === "GET" && path === "/health") return send(res, 200, { status: "ok" });
  send(res, 404, { error: "not found" });
});

load();
smtp.listen(smtpPort, HOST, () => {
  web.listen(webPort, HOST, () => {
    console.log(`[mail] SMTP on ${HOST}:${smtpPort}, inbox http://${HOST}:${webPort}, store ${dir} (${messages.length} kept)`);
  });
});
web.on("error", (err) => {
  console.error(`[mail] inbox failed: ${err.message}`);
  process.exit(1);
});
smtp.server.on("error", (err) => {
  console.error(`[mail] smtp listen failed: ${err.message}`);
  process.exit(1);
});

function shutdown() {
  smtp.close(() => {});
  web.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 1000).unref();
}
process.on("SIGINT", shutdown);
process.on("SIGTERM", shutdown);
