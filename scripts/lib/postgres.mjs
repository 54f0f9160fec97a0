// PostgreSQL cluster owned by the project, run as the `postgres` OS user (initdb and pg_ctl
// refuse to run as root). Node built-ins only.
import { chmodSync, chownSync, existsSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { ensureDir, fail, log, portOpen, run, runSync, warn } from "./util.mjs";

const PG_ROOT = "/usr/lib/postgresql";

/** Installed PostgreSQL majors with an initdb, newest first. */
function installedMajors() {
  if (!existsSync(PG_ROOT)) return [];
  return readdirSync(PG_ROOT)
    .filter((v) => /^\d+(\.\d+)?$/.test(v) && existsSync(join(PG_ROOT, v, "bin", "initdb")))
    .sort((a, b) => Number(b) - Number(a));
}

export function findPgBin({ major } = {}) {
  const majors = installedMajors();
  const pick = major && majors.includes(String(major)) ? String(major) : majors[0];
  return pick ? join(PG_ROOT, pick, "bin") : undefined;
}

export async function ensurePostgresInstalled() {
  let bin = findPgBin();
  if (!bin) {
    log("PostgreSQL not found: installing it with apt-get (one time)");
    await run("apt-get", ["update"], { env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
    await run("apt-get", ["install", "-y", "postgresql"], { env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
    bin = findPgBin();
    if (!bin) throw fail(`apt-get installed postgresql but no ${PG_ROOT}/*/bin/initdb was found`);
  }
  ensurePostgresUser();
  return bin;
}

function ensurePostgresUser() {
  if (runSync("id", ["-u", "postgres"]).status === 0) return;
  log("creating the postgres OS user");
  const r = runSync("useradd", ["--system", "--user-group", "--home-dir", "/var/lib/postgresql", "--shell", "/bin/bash", "postgres"]);
  if (r.status !== 0) throw fail(`useradd postgres failed: ${r.stderr.trim()}`);
}

function postgresIds() {
  const uid = Number(runSync("id", ["-u", "postgres"]).stdout.trim());
  const gid = Number(runSync("id", ["-g", "postgres"]).stdout.trim());
  return { uid, gid };
}

/** The postgres user must be able to traverse every ancestor of dir. */
function ensureTraversable(dir) {
  const chain = [];
  for (let d = resolve(dir); ; d = dirname(d)) {
    chain.unshift(d);
    if (d === dirname(d)) break;
  }
  for (const d of chain) {
    if (!existsSync(d)) break;
    const probe = runSync("runuser", ["-u", "postgres", "--", "test", "-x", d]);
    if (probe.status !== 0) {
      const mode = statSync(d).mode & 0o7777;
      warn(`giving other users traverse (o+x) permission on ${d} so PostgreSQL can reach its data`);
      chmodSync(d, mode | 0o001);
    }
  }
}

function ownedDir(dir, ids, mode) {
  ensureDir(dir);
  chownSync(dir, ids.uid, ids.gid);
  chmodSync(dir, mode);
}

function pgUser(bin, tool, args, opts = {}) {
  return run("runuser", ["-u", "postgres", "--", join(bin, tool), ...args], opts);
}

/**
 * cluster: { dataDir, sockDir, logFile, port, database }
 * Initialises (if needed) and starts the cluster, reusing one already running on dataDir.
 */
export async function ensureCluster(cluster, { fresh = false } = {}) {
  const { dataDir, sockDir, logFile, port, database } = cluster;
  let bin = await ensurePostgresInstalled();
  const ids = postgresIds();

  // a folder the postgres user can reach: traverse on the project's .nightmark and above
  ensureDir(dirname(dataDir));
  ensureTraversable(dirname(dataDir));
  ensureTraversable(dirname(logFile));

  if (fresh && existsSync(dataDir)) {
    await stopCluster(cluster, { mode: "immediate", quiet: true });
    rmSync(dataDir, { recursive: true, force: true });
  }

  const versionFile = join(dataDir, "PG_VERSION");
  if (existsSync(dataDir) && !existsSync(versionFile)) {
    warn(`${dataDir} exists without PG_VERSION (interrupted initdb?): recreating it`);
    rmSync(dataDir, { recursive: true, force: true });
  }
  if (existsSync(versionFile)) {
    const major = readFileSync(versionFile, "utf8").trim();
    const match = findPgBin({ major });
    if (!match || !match.includes(`/${major}/`)) {
      throw fail(
        `${dataDir} was made by PostgreSQL ${major} but only ${bin} is installed. ` +
          `Remove ${dataDir} to start over (its data will be lost), or install postgresql-${major}.`,
      );
    }
    bin = match;
  }

  ownedDir(sockDir, ids, 0o700);
  ensureDir(dirname(logFile));
  if (!existsSync(logFile)) writeFileSync(logFile, "");
  chownSync(logFile, ids.uid, ids.gid);

  if (!existsSync(versionFile)) {
    ownedDir(dataDir, ids, 0o700);
    log(`initdb ${dataDir} (PostgreSQL ${bin.split("/").at(-2)})`);
    await pgUser(bin, "initdb", ["-D", dataDir, "-U", "postgres", "--auth=trust", "-E", "UTF8", "--locale=C.UTF-8"], { quiet: true });
  } else {
    // keep ownership/mode right even if someone copied the folder as root
    chownSync(dataDir, ids.uid, ids.gid);
    chmodSync(dataDir, 0o700);
  }

  const running = runningInfo(cluster);
  if (running && running.port !== port) {
    log(`PostgreSQL on ${dataDir} runs on port ${running.port}, wanted ${port}: restarting it`);
    await stopCluster(cluster, { quiet: true });
  }
  if (running && running.port === port && (await isReady(bin, cluster))) {
    log(`PostgreSQL already running on 127.0.0.1:${port} (${dataDir})`);
  } else {
    if (await portOpen(port)) {
      throw fail(`port ${port} is already in use by another program; set a different port (see README) or stop it`);
    }
    log(`starting PostgreSQL on 127.0.0.1:${port}`);
    const start = () =>
      pgUser(bin, "pg_ctl", [
        "-D", dataDir,
        "-l", logFile,
        "-w", "-t", "30",
        "-o", `-p ${port} -c listen_addresses=127.0.0.1 -k ${sockDir}`,
        "start",
      ], { quiet: true });
    try {
      await start().catch(async () => {
        // a postmaster killed a moment ago can leave its lock briefly: one retry
        await new Promise((r) => setTimeout(r, 1500));
        await start();
      });
    } catch (err) {
      const logTail = readFileSync(logFile, "utf8").trimEnd().split("\n").slice(-15).join("\n");
      throw fail(`${err.message}\n--- ${logFile} ---\n${logTail}`);
    }
  }

  await ensureDatabase(bin, cluster, database);
  return bin;
}

/** {pid, port} from postmaster.pid when a postmaster for dataDir is alive. */
function runningInfo({ dataDir }) {
  const pidFile = join(dataDir, "postmaster.pid");
  if (!existsSync(pidFile)) return undefined;
  const lines = readFileSync(pidFile, "utf8").split("\n");
  const pid = Number(lines[0]);
  const port = Number(lines[3]);
  if (!pid) return undefined;
  try {
    process.kill(pid, 0);
  } catch {
    return undefined;
  }
  return { pid, port };
}

async function isReady(bin, { port }) {
  const r = runSync(join(bin, "pg_isready"), ["-h", "127.0.0.1", "-p", String(port), "-U", "postgres", "-t", "5"]);
  return r.status === 0;
}

function psql(bin, port, sql, db = "postgres") {
  return runSync(join(bin, "psql"), ["-h", "127.0.0.1", "-p", String(port), "-U", "postgres", "-d", db, "-v", "ON_ERROR_STOP=1", "-tAc", sql]);
}

async function ensureDatabase(bin, { port }, database) {
  if (!/^[a-z_][a-z0-9_]*$/.test(database)) throw fail(`bad database name ${database}`);
  const q = psql(bin, port, `SELECT 1 FROM pg_database WHERE datname = '${database}'`);
  if (q.status !== 0) throw fail(`psql failed: ${q.stderr.trim()}`);
  if (q.stdout.trim() === "1") return;
  log(`creating database ${database}`);
  const c = psql(bin, port, `CREATE DATABASE ${database}`);
  if (c.status !== 0) throw fail(`CREATE DATABASE ${database} failed: ${c.stderr.trim()}`);
}

export async function stopCluster(cluster, { mode = "fast", quiet = false } = {}) {
  const { dataDir } = cluster;
  if (!existsSync(join(dataDir, "PG_VERSION"))) return false;
  if (!runningInfo(cluster)) {
    if (!quiet) log(`PostgreSQL (${dataDir}) is not running`);
    return false;
  }
  const major = readFileSync(join(dataDir, "PG_VERSION"), "utf8").trim();
  const bin = findPgBin({ major });
  if (!bin) {
    warn("no pg_ctl found to stop PostgreSQL");
    return false;
  }
  if (!quiet) log(`stopping PostgreSQL (${dataDir})`);
  await pgUser(bin, "pg_ctl", ["-D", dataDir, "-m", mode, "-w", "-t", "30", "stop"], { quiet: true, allowFail: true });
  return true;
}

/** The options a cluster's postmaster was last started with (postmaster.opts), without -D. */
function postmasterOptions(dataDir) {
  const raw = readFileSync(join(dataDir, "postmaster.opts"), "utf8").trim();
  const args = [...raw.matchAll(/"([^"]*)"/g)].map((m) => m[1]);
  const out = [];
  for (let i = 0; i < args.length; i++) {
    if (args[i] === "-D") i++;
    else out.push(args[i]);
  }
  return out.join(" ");
}

/**
 * Stops a running cluster ("fast": sessions are cut, as in a crash-free restart) and starts it again
 * after pauseMs with the options it ran with. For the fault tests (tests/integration/zz-load-faults).
 */
export async function restartCluster({ dataDir, logFile }, { mode = "fast", pauseMs = 0 } = {}) {
  const major = readFileSync(join(dataDir, "PG_VERSION"), "utf8").trim();
  const bin = findPgBin({ major });
  if (!bin) throw fail(`no PostgreSQL ${major} binaries to restart ${dataDir}`);
  const opts = postmasterOptions(dataDir);
  await pgUser(bin, "pg_ctl", ["-D", dataDir, "-m", mode, "-w", "-t", "30", "stop"], { quiet: true });
  if (pauseMs > 0) await new Promise((r) => setTimeout(r, pauseMs));
  await pgUser(bin, "pg_ctl", ["-D", dataDir, "-l", logFile, "-w", "-t", "30", "-o", opts, "start"], { quiet: true });
}
