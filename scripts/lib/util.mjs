// Small helpers for scripts/stack.mjs. Node built-ins only (runs before `npm install`).
import { spawn, spawnSync } from "node:child_process";
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import { connect } from "node:net";
import { join } from "node:path";

export const PREFIX = "[nightmark]";

export function log(msg) {
  console.log(`${PREFIX} ${msg}`);
}
export function warn(msg) {
  console.warn(`${PREFIX} warning: ${msg}`);
}
export function fail(msg) {
  const err = new Error(msg);
  err.nightmark = true;
  return err;
}

export function secondsSince(t0) {
  return ((Date.now() - t0) / 1000).toFixed(1);
}

export const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

/** Foreground commands in flight (killed if the stack is interrupted). */
export const activeRuns = new Set();

/** Runs a command to completion with inherited output; rejects on a non-zero exit. */
export function run(cmd, args, { env, cwd, quiet = false, allowFail = false, stdio } = {}) {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, {
      cwd,
      env: env ?? process.env,
      stdio: stdio ?? (quiet ? ["ignore", "pipe", "pipe"] : ["ignore", "inherit", "inherit"]),
    });
    activeRuns.add(child);
    let out = "";
    child.stdout?.on("data", (d) => (out += d));
    child.stderr?.on("data", (d) => (out += d));
    child.on("error", (err) => reject(fail(`${cmd}: ${err.message}`)));
    child.on("close", (code, signal) => {
      activeRuns.delete(child);
      if (code === 0 || allowFail) resolve({ code, signal, out });
      else {
        const tail = quiet && out ? `\n${out.trim().split("\n").slice(-20).join("\n")}` : "";
        reject(fail(`${cmd} ${args.join(" ")} exited with ${code ?? signal}${tail}`));
      }
    });
  });
}

/** Synchronous, captured: {status, stdout, stderr}. */
export function runSync(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { encoding: "utf8", ...opts });
  return { status: r.status, stdout: r.stdout ?? "", stderr: r.stderr ?? "", error: r.error };
}

export function commandExists(cmd) {
  return runSync("sh", ["-c", `command -v ${cmd}`]).status === 0;
}

/** True when something accepts TCP connections on 127.0.0.1:port. */
export function portOpen(port, host = "127.0.0.1") {
  return new Promise((resolve) => {
    const s = connect({ port, host });
    const done = (v) => {
      s.destroy();
      resolve(v);
    };
    s.setTimeout(1000, () => done(false));
    s.once("connect", () => done(true));
    s.once("error", () => done(false));
  });
}

export async function waitForPort(port, { timeoutMs = 15000, name = `port ${port}`, isAlive } = {}) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await portOpen(port)) return;
    if (isAlive && !isAlive()) throw fail(`${name} exited before listening on ${port}`);
    await sleep(150);
  }
  throw fail(`${name} did not listen on 127.0.0.1:${port} within ${timeoutMs / 1000} s`);
}

/** Waits for any HTTP answer (any status) from url. Returns the status. */
export async function waitForHttp(url, { timeoutMs = 60000, name = url, isAlive } = {}) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(10000), redirect: "manual" });
      await res.arrayBuffer().catch(() => {});
      return res.status;
    } catch {
      // not up yet
    }
    if (isAlive && !isAlive()) throw fail(`${name} exited before answering`);
    await sleep(300);
  }
  throw fail(`${name} gave no HTTP answer within ${timeoutMs / 1000} s`);
}

export function ensureDir(dir, mode) {
  mkdirSync(dir, { recursive: true, ...(mode ? { mode } : {}) });
}

export function readJson(file) {
  try {
    return JSON.parse(readFileSync(file, "utf8"));
  } catch {
    return undefined;
  }
}

export function tail(file, lines = 30) {
  try {
    return readFileSync(file, "utf8").trimEnd().split("\n").slice(-lines).join("\n");
  } catch {
    return "";
  }
}

/** Newest mtime (ms) of the files under the given paths (directories walked, node_modules skipped). */
export function newestMtime(paths) {
  let newest = 0;
  let newestPath = "";
  const visit = (p) => {
    let st;
    try {
      st = statSync(p);
    } catch {
      return;
    }
    if (st.isDirectory()) {
      for (const name of readdirSync(p)) {
        if (name === "node_modules" || name.startsWith(".next")) continue;
        visit(join(p, name));
      }
    } else if (st.mtimeMs > newest) {
      newest = st.mtimeMs;
      newestPath = p;
    }
  };
  for (const p of paths) visit(p);
  return { newest, newestPath };
}

// ---------------------------------------------------------------------------------------------
// Child processes with pid files. Each child runs in its own process group (detached) so it and
// everything it spawns (npx -> node -> next workers) are stopped together.

/** Linux process start time (clock ticks since boot), to tell a live pid from a reused one. */
export function procStart(pid) {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    // the command name (field 2) may contain spaces: split after the closing parenthesis
    const rest = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return rest[19]; // field 22 overall
  } catch {
    return undefined;
  }
}

export function pidAlive(pid) {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return err.code === "EPERM";
  }
}

function groupAlive(pgid) {
  try {
    process.kill(-pgid, 0);
    return true;
  } catch (err) {
    return err.code === "EPERM";
  }
}

export function writePidFile(file, info) {
  writeFileSync(file, JSON.stringify({ ...info, start: procStart(info.pid) }) + "\n");
}

/** A pid file's record if its process is still the one that wrote it. */
export function livePidFile(file) {
  const info = readJson(file);
  if (!info || !Number.isInteger(info.pid) || info.pid <= 1) return undefined;
  if (!pidAlive(info.pid) && !(info.group && groupAlive(info.pid))) return undefined;
  const start = procStart(info.pid);
  if (info.start && start && start !== info.start) return undefined; // pid reused
  return info;
}

/** Stops a process group (or a single pid): SIGTERM, then SIGKILL after graceMs. */
export async function stopProcess(pid, { group = true, graceMs = 8000 } = {}) {
  const target = group ? -pid : pid;
  const alive = () => (group ? groupAlive(pid) : pidAlive(pid));
  try {
    process.kill(target, "SIGTERM");
  } catch {
    return;
  }
  const deadline = Date.now() + graceMs;
  while (Date.now() < deadline) {
    if (!alive()) return;
    await sleep(100);
  }
  try {
    process.kill(target, "SIGKILL");
  } catch {
    // gone
  }
  for (let i = 0; i < 20 && alive(); i++) await sleep(100);
}

/**
 * Starts a supervised child. `output`: "inherit" or a log file path.
 * Returns { name, child, alive(), exited: Promise<{code, signal}> }.
 */
export function startChild(name, cmd, args, { env, cwd, output = "inherit", pidFile } = {}) {
  let fd;
  let stdio;
  if (output === "inherit") stdio = ["ignore", "inherit", "inherit"];
  else {
    fd = openSync(output, "a");
    writeFileSync(fd, `\n===== ${new Date().toISOString()} ${cmd} ${args.join(" ")}\n`);
    stdio = ["ignore", fd, fd];
  }
  const child = spawn(cmd, args, { cwd, env, stdio, detached: true });
  if (fd !== undefined) closeSync(fd);
  let running = true;
  const exited = new Promise((resolve) => {
    child.on("exit", (code, signal) => {
      running = false;
      resolve({ code, signal });
    });
    child.on("error", (err) => {
      running = false;
      console.error(`${PREFIX} ${name} failed to start: ${err.message}`);
      resolve({ code: 127, signal: null });
    });
  });
  if (pidFile && child.pid) writePidFile(pidFile, { pid: child.pid, name, group: true, cmd: [cmd, ...args].join(" ") });
  return {
    name,
    child,
    pidFile,
    output,
    alive: () => running,
    exited,
    async stop(graceMs) {
      if (child.pid) await stopProcess(child.pid, { group: true, graceMs });
      if (pidFile) rmSync(pidFile, { force: true });
    },
  };
}

export { existsSync, rmSync, readdirSync, statSync, writeFileSync, readFileSync, mkdirSync };
