// Counting the SQL statements a page sends: `log_statement = 'all'` is set for the benchmark
// database only (ALTER DATABASE), so only connections to it write their statements into the
// cluster's log; the app server is restarted so its pool opens connections with the setting.
// Each page is requested once to warm up, then a few times; the log lines written meanwhile
// are counted and divided by the request count (this script holds no connection to the
// benchmark database meanwhile, so every such line is the app server's).
import { closeSync, openSync, readSync, statSync } from "node:fs";
import { withClient } from "./services.ts";
import { sleep } from "./stats.ts";

export type QueryCount = { label: string; path: string; perRequest: number; statements: string[] };

const LINE = /\[(\d+)\][^\n]*?LOG:\s+(?:statement|execute [^:]*):\s+(.*)$/;

export async function setStatementLogging(databaseUrl: string, database: string, on: boolean) {
  await withClient(databaseUrl, (c) => c.query(on ? `ALTER DATABASE "${database}" SET log_statement = 'all'` : `ALTER DATABASE "${database}" RESET log_statement`));
}

function readFrom(file: string, offset: number): string {
  const size = statSync(file).size;
  if (size <= offset) return "";
  const buffer = Buffer.alloc(size - offset);
  const fd = openSync(file, "r");
  try {
    readSync(fd, buffer, 0, buffer.length, offset);
  } finally {
    closeSync(fd);
  }
  return buffer.toString("utf8");
}

/** A short name for a statement: its verb and the tables it reads or writes. */
function shape(sqlText: string): string {
  const verb = sqlText.trim().split(/\s+/)[0].toLowerCase();
  const tables = [...new Set([...sqlText.matchAll(/\b(?:from|join|into|update)\s+"?(\w+)"?/gi)].map((m) => m[1]))];
  return tables.length ? `${verb} ${tables.join("+")}` : verb;
}

export async function countQueries(logFile: string, origin: string, pages: { label: string; path: string; cookie: string | null }[], repeats = 3): Promise<QueryCount[]> {
  const out: QueryCount[] = [];
  for (const page of pages) {
    const get = async () => {
      const response = await fetch(`${origin}${page.path}`, { redirect: "manual", headers: page.cookie ? { Cookie: page.cookie } : {} });
      await response.arrayBuffer();
      if (response.status !== 200) throw new Error(`${page.path} answered ${response.status} while counting queries`);
    };
    await get();
    await sleep(200);
    const offset = statSync(logFile).size;
    for (let i = 0; i < repeats; i++) await get();
    await sleep(300);
    const statements: string[] = [];
    for (const line of readFrom(logFile, offset).split("\n")) {
      const m = LINE.exec(line);
      if (m) statements.push(shape(m[2]));
    }
    if (statements.length % repeats !== 0) throw new Error(`${page.label}: ${statements.length} statements in ${repeats} requests is not a whole number per request; another client used the benchmark database`);
    out.push({ label: page.label, path: page.path, perRequest: statements.length / repeats, statements: statements.slice(0, statements.length / repeats) });
  }
  return out;
}
