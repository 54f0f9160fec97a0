/**
 * Process helpers for the benches: find the web and worker processes of a running stack and sample
 * their resident memory (VmRSS, children included) from /proc. Linux only; loopback only.
 */
import { execFileSync } from "node:child_process";
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";

function ssPids(filter: string[], listening: boolean): number[] {
  try {
    const out = execFileSync("ss", [listening ? "-ltnpH" : "-tnpH", ...filter], { encoding: "utf8" });
    return [...new Set([...out.matchAll(/pid=(\d+)/g)].map((m) => Number(m[1])))];
  } catch {
    return [];
  }
}

const cmdline = (pid: number) => {
  try {
    return readFileSync(`/proc/${pid}/cmdline`, "utf8").split("\0").join(" ");
  } catch {
    return "";
  }
};

function pidFile(file: string): number | undefined {
  if (!existsSync(file)) return undefined;
  const raw = readFileSync(file, "utf8").trim();
  const n = Number(raw.startsWith("{") ? (JSON.parse(raw) as { pid?: number }).pid : raw);
  return Number.isInteger(n) && n > 0 && existsSync(`/proc/${n}`) ? n : undefined;
}

/** The process listening on the app's port (env WEB_PID first). */
export function findWebPid(appUrl: string): number | undefined {
  if (process.env.WEB_PID) return Number(process.env.WEB_PID);
  const port = new URL(appUrl).port || "80";
  return ssPids([`sport = :${port}`], true)[0];
}

/**
 * The worker that serves this database: a process running ingest/worker.ts with a connection to
 * the database's port (env WORKER_PID first, then .nightmark/run/*worker.pid as a last resort).
 */
export function findWorkerPid(databaseUrl: string, root = process.cwd()): number | undefined {
  if (process.env.WORKER_PID) return Number(process.env.WORKER_PID);
  const port = new URL(databaseUrl).port || "5432";
  const connected = ssPids([`dport = :${port}`], false).filter((p) => cmdline(p).includes("ingest/worker.ts"));
  if (connected.length > 0) return connected[0];
  const run = join(root, ".nightmark", "run");
  if (!existsSync(run)) return undefined;
  const prefix = port === "54339" ? "test-" : "";
  return pidFile(join(run, `${prefix}worker.pid`));
}

/** pid and all its descendants. */
export function processTree(pid: number): number[] {
  const children = new Map<number, number[]>();
  for (const d of readdirSync("/proc")) {
    if (!/^\d+$/.test(d)) continue;
    try {
      const stat = readFileSync(`/proc/${d}/stat`, "utf8");
      const ppid = Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]);
      const list = children.get(ppid) ?? [];
      list.push(Number(d));
      children.set(ppid, list);
    } catch {
      // exited while we looked
    }
  }
  const out: number[] = [];
  const stack = [pid];
  while (stack.length) {
    const p = stack.pop()!;
    out.push(p);
    stack.push(...(children.get(p) ?? []));
  }
  return out;
}

export function rssKb(pid: number): number {
  try {
    const m = /VmRSS:\s+(\d+)\s+kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) : 0;
  } catch {
    return 0;
  }
}

/** Samples the summed RSS of each named process tree every intervalMs; stop() returns peaks in MB. */
export function sampleRss(targets: Record<string, number | undefined>, intervalMs = 100) {
  const peaks: Record<string, number> = {};
  const trees: Record<string, number[]> = {};
  let lastTree = 0;
  const tick = () => {
    const now = Date.now();
    if (now - lastTree > 2000) {
      for (const [k, pid] of Object.entries(targets)) if (pid) trees[k] = processTree(pid);
      lastTree = now;
    }
    for (const [k, pids] of Object.entries(trees)) {
      const kb = pids.reduce((s, p) => s + rssKb(p), 0);
      peaks[k] = Math.max(peaks[k] ?? 0, kb);
    }
  };
  tick();
  const timer = setInterval(tick, intervalMs);
  return {
    stop(): Record<string, number | null> {
      clearInterval(timer);
      tick();
      return Object.fromEntries(Object.keys(targets).map((k) => [k, peaks[k] ? Math.round(peaks[k]! / 1024) : null]));
    },
  };
}
