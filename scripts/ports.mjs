// Port checks shared by the start and test commands, the local fakes and the app
// server: whether a port is free, who holds it, and the one line that says so.
// Node built-ins only: this runs before `npm ci` has ever run.
import { readFileSync, readdirSync, readlinkSync } from "node:fs";
import net from "node:net";
import path from "node:path";

const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");

/** A failure the user can fix; the start command prints its message alone, without a stack trace. */
export class UserFixableError extends Error {
  constructor(message) {
    super(message);
    this.name = "UserFixableError";
  }
}

/** Whether `host:port` can be listened on right now (probing by listening, exactly as the service will). */
export function portFree(port, host = "127.0.0.1") {
  return new Promise((resolve) => {
    const probe = net.createServer();
    probe.unref();
    probe.once("error", () => resolve(false));
    probe.listen({ port, host, exclusive: true }, () => probe.close(() => resolve(true)));
  });
}

/** A port the system reports free on `host` now. */
export function freePort(host = "127.0.0.1") {
  return new Promise((resolve, reject) => {
    const probe = net.createServer();
    probe.once("error", reject);
    probe.listen(0, host, () => {
      const address = probe.address();
      probe.close(() => resolve(typeof address === "object" && address ? address.port : 0));
    });
  });
}

/** The process listening on a TCP port, read from /proc (Linux); null where it cannot be seen. */
export function portHolder(port) {
  try {
    const inodes = new Set();
    for (const table of ["/proc/net/tcp", "/proc/net/tcp6"]) {
      let text = "";
      try {
        text = readFileSync(table, "utf8");
      } catch {
        continue;
      }
      for (const line of text.split("\n").slice(1)) {
        const cols = line.trim().split(/\s+/);
        if (cols.length < 10 || cols[3] !== "0A") continue; // 0A: LISTEN
        if (parseInt(cols[1].split(":")[1], 16) === port) inodes.add(cols[9]);
      }
    }
    if (inodes.size === 0) return null;
    const pids = readdirSync("/proc").filter((d) => /^\d+$/.test(d)).map(Number).sort((a, b) => a - b);
    for (const pid of pids) {
      let fds = [];
      try {
        fds = readdirSync(`/proc/${pid}/fd`);
      } catch {
        continue;
      }
      for (const fd of fds) {
        let link = "";
        try {
          link = readlinkSync(`/proc/${pid}/fd/${fd}`);
        } catch {
          continue;
        }
        const m = /^socket:\[(\d+)\]$/.exec(link);
        if (m && inodes.has(m[1])) {
          const cmdline = readFileSync(`/proc/${pid}/cmdline`, "utf8").split("\0").filter(Boolean);
          let cwd = "";
          try {
            cwd = readlinkSync(`/proc/${pid}/cwd`);
          } catch {}
          return { pid, cmdline, cwd };
        }
      }
    }
  } catch {}
  return null;
}

/** Who holds the port, in words: this checkout's own app or PostgreSQL, or another program by pid. */
export function describeHolder(port, { dataDir } = {}) {
  const holder = portHolder(port);
  if (!holder) return "another program";
  const args = holder.cmdline;
  const joined = args.join(" ");
  if (holder.cwd === ROOT && args.some((a) => a.endsWith("scripts/server.mjs"))) {
    return `Blindcut from this checkout, already running (pid ${holder.pid})`;
  }
  if (holder.cwd === ROOT && args.some((a) => a.endsWith("scripts/local-services.ts"))) {
    return `this checkout's local fakes, already running (pid ${holder.pid})`;
  }
  const dataFlag = args.indexOf("-D");
  if (dataDir && dataFlag >= 0 && args[dataFlag + 1] === dataDir) {
    return `this checkout's own PostgreSQL (pid ${holder.pid}; \`npm run db:stop\` stops it)`;
  }
  const short = joined.length > 80 ? `${joined.slice(0, 77)}...` : joined;
  return `another program (pid ${holder.pid}: ${short})`;
}

/** The one line for a taken port: the service, the address, who holds it and the variable that moves it. */
export function portTakenMessage({ service, port, host, variable, hint, dataDir }) {
  const who = describeHolder(port, { dataDir });
  return `${service} cannot listen on ${host}:${port}: the port is taken by ${who}. Stop it, or set ${variable} to a free port${hint ? ` ${hint}` : ""}.`;
}
