#!/usr/bin/env node
// Nightmark local stack: one command brings up everything the app needs, as root, on loopback.
//
//   node scripts/stack.mjs start   production build + next start      (npm start)
//   node scripts/stack.mjs dev     next dev                            (npm run dev)
//   node scripts/stack.mjs stop    stop what start/dev left running    (npm run stop)
//   node scripts/stack.mjs test    throwaway test stack + vitest + playwright (npm test)
//
// Plain Node ESM with built-ins only: it must run on a fresh machine before `npm install`.
import { randomBytes } from "node:crypto";
import { chmodSync, existsSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { createHash } from "node:crypto";
import { tmpdir } from "node:os";
import { dirname, join, relative, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { ensureCluster, stopCluster } from "./lib/postgres.mjs";
import {
  activeRuns,
  commandExists,
  ensureDir,
  fail,
  livePidFile,
  log,
  newestMtime,
  portOpen,
  readJson,
  run,
  secondsSince,
  sleep,
  startChild,
  stopProcess,
  tail,
  waitForHttp,
  waitForPort,
  warn,
  writePidFile,
} from "./lib/util.mjs";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..");
const NM = join(ROOT, ".nightmark");
const LOGS = join(NM, "logs");
const RUN = join(NM, "run");
const BUCKET = "nightmark-uploads";

process.chdir(ROOT);

function envPort(name, fallback) {
  const raw = process.env[name];
  if (raw === undefined || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 65535) throw fail(`${name}=${raw} is not a port number`);
  return n;
}

/** Unix socket paths are limited to ~107 bytes; fall back to a short folder under /tmp. */
function socketDir(preferred, port) {
  if (`${preferred}/.s.PGSQL.${port}`.length <= 100) return preferred;
  const h = createHash("sha1").update(preferred).digest("hex").slice(0, 10);
  return join(tmpdir(), `nightmark-${h}`);
}

function config(mode) {
  const test = mode === "test";
  const tag = test ? "test" : "dev"; // start and dev share one database, mailbox and bucket
  const pgPort = test ? envPort("NIGHTMARK_TEST_PG_PORT", 54339) : envPort("NIGHTMARK_PG_PORT", 54329);
  const appPort = test ? envPort("NIGHTMARK_TEST_PORT", 3100) : envPort("NIGHTMARK_PORT", 3000);
  const smtpPort = test ? envPort("NIGHTMARK_TEST_SMTP_PORT", 2025) : envPort("NIGHTMARK_SMTP_PORT", 1025);
  const mailWebPort = test ? envPort("NIGHTMARK_TEST_MAIL_WEB_PORT", 2080) : envPort("NIGHTMARK_MAIL_WEB_PORT", 1080);
  const s3Port = test ? envPort("NIGHTMARK_TEST_S3_PORT", 4579) : envPort("NIGHTMARK_S3_PORT", 4569);
  const database = test ? "nightmark_test" : "nightmark";
  const dataDir = join(NM, test ? "pg-test" : "pg");
  return {
    mode,
    test,
    pg: {
      dataDir,
      sockDir: socketDir(join(NM, test ? "pg-test-sock" : "pg-sock"), pgPort),
      logFile: join(LOGS, test ? "postgres-test.log" : "postgres.log"),
      port: pgPort,
      database,
    },
    appPort,
    smtpPort,
    mailWebPort,
    s3Port,
    distDir: test ? ".next-test" : process.env.NEXT_DIST_DIR || ".next",
    mailDir: join(NM, `mail-${tag}`),
    s3Dir: join(NM, `s3-${tag}`),
    prefix: test ? "test-" : "", // pid and log file names
    databaseUrl: `postgres://postgres@127.0.0.1:${pgPort}/${database}`,
    appUrl: `http://127.0.0.1:${appPort}`,
    mailUrl: `http://127.0.0.1:${mailWebPort}`,
    s3Url: `http://127.0.0.1:${s3Port}`,
  };
}

function childEnv(cfg, nodeEnv, secret, extra = {}) {
  return {
    ...process.env,
    NODE_ENV: nodeEnv,
    NIGHTMARK_MODE: cfg.mode,
    DATABASE_URL: cfg.databaseUrl,
    APP_URL: cfg.appUrl,
    NEXTAUTH_URL: cfg.appUrl,
    NEXTAUTH_SECRET: secret,
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(cfg.smtpPort),
    MAIL_INBOX_URL: cfg.mailUrl,
    S3_ENDPOINT: cfg.s3Url,
    S3_REGION: "us-east-1",
    S3_BUCKET: BUCKET,
    S3_ACCESS_KEY_ID: "S3RVER",
    S3_SECRET_ACCESS_KEY: "S3RVER",
    NEXT_DIST_DIR: cfg.distDir,
    NEXT_TELEMETRY_DISABLED: "1",
    // The test suite signs in as many people from one address; it stands in for a proxy that sets X-Forwarded-For.
    ...(cfg.mode === "test" ? { TRUST_PROXY: "true" } : {}),
    ...extra,
  };
}

/** A local binary from node_modules/.bin, or npx as a fallback. */
function bin(name, args) {
  const local = join(ROOT, "node_modules", ".bin", name);
  return existsSync(local) ? [local, args] : ["npx", ["--no-install", name, ...args]];
}

// ---------------------------------------------------------------------------------------------
// bootstrap steps

async function ensureNodeModules() {
  const lock = join(ROOT, "package-lock.json");
  const marker = join(ROOT, "node_modules", ".package-lock.json");
  let reason;
  if (!existsSync(join(ROOT, "node_modules"))) reason = "node_modules is missing";
  else if (!existsSync(marker)) reason = "node_modules has no .package-lock.json";
  else if (existsSync(lock) && statSync(lock).mtimeMs > statSync(marker).mtimeMs) reason = "package-lock.json changed";
  if (!reason) {
    log("npm packages up to date");
    return;
  }
  const t = Date.now();
  const args = existsSync(lock) ? ["ci", "--no-audit", "--no-fund"] : ["install", "--no-audit", "--no-fund"];
  log(`installing npm packages (${reason}): npm ${args[0]}`);
  await run("npm", args, { env: { ...process.env, PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD: "1" } });
  log(`npm packages installed in ${secondsSince(t)} s`);
}

function ensureSecret() {
  const file = join(NM, "secret");
  if (existsSync(file)) {
    const s = readFileSync(file, "utf8").trim();
    if (s.length >= 32) return s;
  }
  const secret = randomBytes(32).toString("base64url");
  writeFileSync(file, secret + "\n", { mode: 0o600 });
  chmodSync(file, 0o600);
  log("generated NEXTAUTH_SECRET in .nightmark/secret");
  return secret;
}

async function migrateAndSeed(cfg, env, profile) {
  let t = Date.now();
  log("applying migrations (db/migrate.ts)");
  const [tsx, migrateArgs] = bin("tsx", ["db/migrate.ts"]);
  await run(tsx, migrateArgs, { env });
  log(`migrations done in ${secondsSince(t)} s`);
  if (process.env.NIGHTMARK_SKIP_SEED === "1") {
    warn("NIGHTMARK_SKIP_SEED=1: not seeding");
    return;
  }
  if (!existsSync(join(ROOT, "db", "seed", "index.ts"))) {
    warn("db/seed/index.ts does not exist yet: skipping the seed");
    return;
  }
  t = Date.now();
  log(`seeding (SEED_PROFILE=${profile})`);
  const [tsx2, seedArgs] = bin("tsx", ["db/seed/index.ts"]);
  await run(tsx2, seedArgs, { env: { ...env, SEED_PROFILE: profile } });
  log(`seed done in ${secondsSince(t)} s`);
}

async function aptInstall(pkgs) {
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  log(`installing ${pkgs.join(", ")} with apt-get`);
  await run("apt-get", ["update"], { env });
  await run("apt-get", ["install", "-y", "--no-install-recommends", ...pkgs], { env });
}

async function ensureTestTools() {
  const missing = [];
  if (!existsSync("/usr/bin/chromium")) missing.push("chromium");
  if (!commandExists("pdftoppm")) missing.push("poppler-utils");
  if (missing.length) await aptInstall(missing);
  else log("chromium and pdftoppm present");
}

async function copyMaplibreWorker() {
  await run(process.execPath, [join(ROOT, "scripts", "copy-maplibre-worker.mjs")]);
}

const BUILD_INPUTS = [
  "app", "components", "lib", "db", "ingest", "public", "hooks", "styles", "types", "emails",
  "next.config.ts", "next.config.mjs", "package.json", "package-lock.json", "tsconfig.json",
  "postcss.config.mjs", "tailwind.config.ts", "middleware.ts", "proxy.ts", "instrumentation.ts",
];

function buildStaleReason(distDir) {
  const idFile = join(ROOT, distDir, "BUILD_ID");
  if (!existsSync(idFile)) return "no build yet";
  const built = statSync(idFile).mtimeMs;
  const { newest, newestPath } = newestMtime(BUILD_INPUTS.map((p) => join(ROOT, p)));
  if (newest > built) return `${relative(ROOT, newestPath)} changed since the last build`;
  return undefined;
}

async function nextBuild(cfg, env) {
  const t = Date.now();
  const [next, args] = bin("next", ["build"]);
  await run(next, args, { env });
  log(`next build (${cfg.distDir}) done in ${secondsSince(t)} s`);
}

// ---------------------------------------------------------------------------------------------
// children and pid files

function pidPath(cfg, name) {
  return join(RUN, `${cfg.prefix}${name}.pid`);
}

/** Stops a previous supervisor of this mode family and any children its pid files name. */
async function stopPrevious(cfg, { quiet = false } = {}) {
  ensureDir(RUN);
  let stopped = 0;
  const sup = livePidFile(pidPath(cfg, "stack"));
  if (sup && sup.pid !== process.pid) {
    log(`stopping the previous Nightmark ${cfg.test ? "test run" : "stack"} (pid ${sup.pid})`);
    await stopProcess(sup.pid, { group: false, graceMs: 15000 });
    stopped++;
  }
  for (const f of readdirSync(RUN)) {
    if (!f.endsWith(".pid")) continue;
    const isTest = f.startsWith("test-");
    if (isTest !== cfg.test) continue;
    const file = join(RUN, f);
    const info = livePidFile(file);
    if (info && info.pid !== process.pid) {
      log(`stopping leftover ${info.name ?? f} (pid ${info.pid})`);
      await stopProcess(info.pid, { group: !!info.group });
      stopped++;
    }
    rmSync(file, { force: true });
  }
  if (!stopped && !quiet) log("nothing left running from a previous run");
  return stopped;
}

async function ensurePortFree(port, what) {
  for (let i = 0; i < 30 && (await portOpen(port)); i++) await sleep(200);
  if (await portOpen(port)) throw fail(`port ${port} (${what}) is in use by another program; stop it or choose another port`);
}

async function startFakes(cfg, env, children) {
  ensureDir(LOGS);
  await ensurePortFree(cfg.smtpPort, "SMTP fake");
  await ensurePortFree(cfg.mailWebPort, "mail inbox");
  await ensurePortFree(cfg.s3Port, "S3 fake");
  const smtp = startChild(
    "smtp-fake",
    process.execPath,
    [join(ROOT, "scripts", "smtp-fake.mjs"), "--smtp-port", String(cfg.smtpPort), "--web-port", String(cfg.mailWebPort), "--dir", cfg.mailDir],
    { env, output: join(LOGS, `${cfg.prefix}smtp.log`), pidFile: pidPath(cfg, "smtp") },
  );
  children.push(smtp);
  const s3 = startChild(
    "s3-fake",
    process.execPath,
    [join(ROOT, "scripts", "s3-fake.mjs"), "--port", String(cfg.s3Port), "--dir", cfg.s3Dir, "--bucket", BUCKET],
    { env, output: join(LOGS, `${cfg.prefix}s3.log`), pidFile: pidPath(cfg, "s3") },
  );
  children.push(s3);
  try {
    await waitForPort(cfg.mailWebPort, { name: "mail fake", isAlive: smtp.alive });
    await waitForPort(cfg.s3Port, { name: "S3 fake", isAlive: s3.alive });
  } catch (err) {
    throw fail(`${err.message}\n--- smtp log ---\n${tail(smtp.output, 10)}\n--- s3 log ---\n${tail(s3.output, 10)}`);
  }
  log(`mail fake: SMTP 127.0.0.1:${cfg.smtpPort}, inbox ${cfg.mailUrl}`);
  log(`S3 fake: ${cfg.s3Url} (bucket ${BUCKET})`);
}

/**
 * A V8 heap cap (MB, overridable by the named variable): it makes the process collect garbage before
 * it grows past its memory budget (400 MB resident); the real working sets are far below it.
 */
function withHeapCap(env, variable, defaultMb) {
  const mb = process.env[variable] ?? String(defaultMb);
  return { ...env, NODE_OPTIONS: `${env.NODE_OPTIONS ?? ""} --max-old-space-size=${mb}`.trim() };
}

/** The ingest worker, restarted with a delay if it crashes (unless we are stopping). */
function startWorker(cfg, env, children, state) {
  if (!existsSync(join(ROOT, "ingest", "worker.ts"))) {
    warn("ingest/worker.ts does not exist yet: not starting the worker");
    return;
  }
  const logFile = join(LOGS, `${cfg.prefix}worker.log`);
  let restarts = 0;
  const launch = () => {
    const [tsx, args] = bin("tsx", ["ingest/worker.ts"]);
    const workerEnv = withHeapCap(env, "WORKER_HEAP_MB", 256);
    const w = startChild("worker", tsx, args, { env: workerEnv, output: logFile, pidFile: pidPath(cfg, "worker") });
    children.push(w);
    w.exited.then(({ code, signal }) => {
      const i = children.indexOf(w);
      if (i >= 0) children.splice(i, 1);
      if (state.stopping) return;
      if (restarts >= 5) {
        warn(`worker exited (${code ?? signal}) again; not restarting. See ${relative(ROOT, logFile)}`);
        return;
      }
      restarts++;
      warn(`worker exited (${code ?? signal}); restarting in 3 s (${restarts}/5). See ${relative(ROOT, logFile)}`);
      setTimeout(() => !state.stopping && launch(), 3000);
    });
  };
  launch();
  log(`worker started (log ${relative(ROOT, logFile)})`);
}

async function stopChildren(children) {
  const list = [...children].reverse();
  children.length = 0;
  await Promise.all(list.map((c) => c.stop(8000)));
}

function killActiveRuns() {
  for (const c of activeRuns) {
    try {
      c.kill("SIGTERM");
    } catch {
      // gone
    }
  }
}

function box(lines) {
  const width = Math.max(...lines.map((l) => l.length)) + 2;
  const out = [`┌${"─".repeat(width)}┐`, ...lines.map((l) => `│ ${l.padEnd(width - 1)}│`), `└${"─".repeat(width)}┘`];
  console.log(out.join("\n"));
}

function demoAccounts() {
  const accounts = readJson(join(ROOT, "db", "seed", "demo-accounts.json"));
  return Array.isArray(accounts) ? accounts.filter((a) => a && a.email) : [];
}

// ---------------------------------------------------------------------------------------------
// start / dev

async function serve(mode) {
  const t0 = Date.now();
  const cfg = config(mode);
  const children = [];
  const state = { stopping: false };
  ensureDir(NM);
  ensureDir(LOGS);
  ensureDir(RUN);
  log(`${mode}: bootstrapping in ${ROOT}`);
  await stopPrevious(cfg, { quiet: true });
  writePidFile(pidPath(cfg, "stack"), { pid: process.pid, name: `stack ${mode}`, group: false });

  const shutdown = async (why, code) => {
    if (state.stopping) return;
    state.stopping = true;
    log(`${why}: stopping the app, worker and fakes (PostgreSQL keeps running; npm run stop stops it)`);
    killActiveRuns();
    await stopChildren(children);
    rmSync(pidPath(cfg, "stack"), { force: true });
    log("stopped");
    process.exit(code);
  };
  for (const sig of ["SIGINT", "SIGTERM", "SIGHUP"]) process.on(sig, () => shutdown(sig, 0));

  try {
    await ensureNodeModules();
    const secret = ensureSecret();
    const nodeEnv = mode === "dev" ? "development" : "production";
    const env = childEnv(cfg, nodeEnv, secret);

    await ensurePortFree(cfg.appPort, "app");
    await ensureCluster(cfg.pg);
    // The fakes first: the seed stores its example upload in the S3 fake.
    await startFakes(cfg, env, children);
    await migrateAndSeed(cfg, env, "demo");
    await copyMaplibreWorker();

    let nextArgs;
    if (mode === "start") {
      const stale = buildStaleReason(cfg.distDir);
      if (stale) {
        log(`building the app (${stale})`);
        await nextBuild(cfg, env);
      } else log("the production build is up to date");
      nextArgs = ["start", "-H", "127.0.0.1", "-p", String(cfg.appPort)];
    } else {
      nextArgs = ["dev", "-H", "127.0.0.1", "-p", String(cfg.appPort)];
    }
    if (state.stopping) return;

    startWorker(cfg, env, children, state);
    const [next, args] = bin("next", nextArgs);
    log(`starting next ${nextArgs[0]} on ${cfg.appUrl}`);
    const app = startChild("next", next, args, { env: mode === "start" ? withHeapCap(env, "WEB_HEAP_MB", 256) : env, output: "inherit", pidFile: pidPath(cfg, "next") });
    children.push(app);
    app.exited.then(({ code, signal }) => {
      if (!state.stopping) shutdown(`next exited (${code ?? signal})`, code || 1);
    });

    await waitForHttp(`${cfg.appUrl}/api/health`, { timeoutMs: 120000, name: "next", isAlive: app.alive });
    const accounts = demoAccounts();
    const lines = [
      `Nightmark is running (${mode === "start" ? "production build" : "development server"}) — ready in ${secondsSince(t0)} s`,
      "",
      `  App          ${cfg.appUrl}`,
      `  Mail inbox   ${cfg.mailUrl}`,
      `  S3 fake      ${cfg.s3Url}  (bucket ${BUCKET})`,
      `  Database     ${cfg.databaseUrl}`,
    ];
    if (accounts.length) {
      lines.push("", "  Demo sign-ins:");
      const rw = Math.max(...accounts.map((a) => String(a.role ?? "").length));
      const ew = Math.max(...accounts.map((a) => String(a.email).length));
      for (const a of accounts) lines.push(`    ${String(a.role ?? "").padEnd(rw)}  ${String(a.email).padEnd(ew)}  ${a.password ?? ""}`);
    }
    lines.push("", `  Logs: .nightmark/logs/    Stop: Ctrl-C (or npm run stop)`);
    box(lines);
    await new Promise(() => {}); // stay in the foreground until a signal or next exits
  } catch (err) {
    if (state.stopping) return;
    console.error(`[nightmark] error: ${err.message}`);
    if (!err.nightmark) console.error(err.stack);
    await shutdown("startup failed", 1);
  }
}

// ---------------------------------------------------------------------------------------------
// stop

async function stop() {
  const cfg = config("start");
  ensureDir(RUN);
  await stopPrevious(cfg);
  const was = await stopCluster(cfg.pg);
  if (was) log("PostgreSQL stopped");
}

// ---------------------------------------------------------------------------------------------
// test

/** Passed / failed / skipped over both runners, from their JSON reports (null when either is missing). */
function countResults(vitestJson, playwrightJson) {
  try {
    const v = JSON.parse(readFileSync(vitestJson, "utf8"));
    const p = JSON.parse(readFileSync(playwrightJson, "utf8"));
    const st = p.stats ?? {};
    return {
      passed: (v.numPassedTests ?? 0) + (st.expected ?? 0) + (st.flaky ?? 0),
      failed: (v.numFailedTests ?? 0) + (st.unexpected ?? 0),
      skipped: (v.numPendingTests ?? 0) + (v.numTodoTests ?? 0) + (st.skipped ?? 0),
    };
  } catch {
    return null;
  }
}

async function test() {
  const t0 = Date.now();
  const cfg = config("test");
  const children = [];
  const state = { stopping: false };
  const results = { vitest: "not run", playwright: "not run" };
  ensureDir(NM);
  ensureDir(LOGS);
  ensureDir(RUN);
  log(`test: bootstrapping a throwaway stack (app ${cfg.appUrl}, PostgreSQL ${cfg.pg.port})`);
  await stopPrevious(cfg, { quiet: true });
  writePidFile(pidPath(cfg, "stack"), { pid: process.pid, name: "stack test", group: false });

  let tornDown = false;
  const teardown = async () => {
    if (tornDown) return;
    tornDown = true;
    state.stopping = true;
    log("tearing down the test stack");
    killActiveRuns();
    await stopChildren(children);
    try {
      await stopCluster(cfg.pg, { quiet: true });
    } catch (err) {
      warn(`stopping the test PostgreSQL: ${err.message}`);
    }
    rmSync(cfg.pg.dataDir, { recursive: true, force: true });
    rmSync(cfg.pg.sockDir, { recursive: true, force: true });
    rmSync(pidPath(cfg, "stack"), { force: true });
  };
  let counts = null;
  const summary = (code) => {
    console.log(`[nightmark] tests: vitest ${results.vitest}, playwright ${results.playwright} (${secondsSince(t0)} s total)`);
    // One plain closing line that any CI can read.
    if (counts) console.log(`tests: ${counts.passed} passed, ${counts.failed} failed, ${counts.skipped} skipped`);
    process.exitCode = code;
  };
  for (const sig of ["SIGINT", "SIGTERM", "SIGHUP"]) {
    process.on(sig, async () => {
      if (state.stopping) return;
      log(`${sig}: aborting the test run`);
      await teardown();
      summary(130);
      process.exit(130);
    });
  }

  let code = 0;
  let next;
  try {
    await ensureNodeModules();
    await ensureTestTools();
    const secret = ensureSecret();
    const env = childEnv(cfg, "production", secret);

    await ensurePortFree(cfg.appPort, "test app");
    rmSync(cfg.mailDir, { recursive: true, force: true });
    rmSync(cfg.s3Dir, { recursive: true, force: true });
    let t = Date.now();
    await ensureCluster(cfg.pg, { fresh: true });
    log(`test PostgreSQL ready in ${secondsSince(t)} s`);
    await startFakes(cfg, env, children);
    await migrateAndSeed(cfg, env, "test");

    await copyMaplibreWorker();
    log(`building the app into ${cfg.distDir}`);
    await nextBuild(cfg, env);

    const nextLog = join(LOGS, "test-next.log");
    rmSync(nextLog, { force: true });
    const [nextBin, nextArgs] = bin("next", ["start", "-H", "127.0.0.1", "-p", String(cfg.appPort)]);
    next = startChild("next", nextBin, nextArgs, { env: withHeapCap(env, "WEB_HEAP_MB", 256), output: nextLog, pidFile: pidPath(cfg, "next") });
    children.push(next);
    startWorker(cfg, env, children, state);
    t = Date.now();
    try {
      const status = await waitForHttp(`${cfg.appUrl}/api/health`, { timeoutMs: 60000, name: "next start", isAlive: next.alive });
      log(`app answered /api/health with ${status} after ${secondsSince(t)} s (server log ${relative(ROOT, nextLog)})`);
    } catch (err) {
      throw fail(`${err.message}\n--- ${relative(ROOT, nextLog)} ---\n${tail(nextLog, 30)}`);
    }

    const runnerEnv = childEnv(cfg, "test", secret);
    t = Date.now();
    log("running vitest (unit + integration)");
    const vitestJson = join(NM, "test-vitest.json");
    const playwrightJson = join(NM, "test-playwright.json");
    rmSync(vitestJson, { force: true });
    rmSync(playwrightJson, { force: true });
    const [vitest, vArgs] = bin("vitest", ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${vitestJson}`]);
    const v = await run(vitest, vArgs, { env: runnerEnv, allowFail: true, stdio: "inherit" });
    results.vitest = v.code === 0 ? "ok" : `FAILED (exit ${v.code ?? v.signal})`;
    log(`vitest ${results.vitest} in ${secondsSince(t)} s`);
    if (state.stopping) return;

    t = Date.now();
    log("running playwright");
    const [pw, pArgs] = bin("playwright", ["test", "--reporter=list,json"]);
    const p = await run(pw, pArgs, { env: { ...runnerEnv, PLAYWRIGHT_JSON_OUTPUT_NAME: playwrightJson }, allowFail: true, stdio: "inherit" });
    counts = countResults(vitestJson, playwrightJson);
    results.playwright = p.code === 0 ? "ok" : `FAILED (exit ${p.code ?? p.signal})`;
    log(`playwright ${results.playwright} in ${secondsSince(t)} s`);
    if (v.code !== 0 || p.code !== 0) {
      code = 1;
      log(`server log: ${relative(ROOT, nextLog)}, worker log: .nightmark/logs/test-worker.log`);
    }
  } catch (err) {
    if (state.stopping) return;
    code = 1;
    console.error(`[nightmark] error: ${err.message}`);
    if (!err.nightmark) console.error(err.stack);
  }
  await teardown();
  summary(code);
  process.exit(code);
}

// ---------------------------------------------------------------------------------------------

const commands = { start: () => serve("start"), dev: () => serve("dev"), stop, test };
const cmd = process.argv[2];
if (!commands[cmd]) {
  console.error("usage: node scripts/stack.mjs start|dev|stop|test");
  process.exit(2);
}
commands[cmd]().catch((err) => {
  console.error(`[nightmark] error: ${err.message}`);
  if (!err.nightmark) console.error(err.stack);
  process.exit(1);
});
