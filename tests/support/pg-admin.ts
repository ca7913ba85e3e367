// Administrative access to the test cluster started by `npm test` (or `npm run db:start`).
import pg from "pg";

export const pgPort = Number(process.env.BLINDCUT_PG_PORT ?? 54329);
export const adminUrl = process.env.BLINDCUT_TEST_ADMIN_URL ?? `postgres://postgres@127.0.0.1:${pgPort}/postgres`;

export function databaseUrlFor(name: string) {
  const url = new URL(adminUrl);
  url.pathname = `/${name}`;
  return url.toString();
}

export async function withAdmin<T>(fn: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/** A fresh database cloned from the migrated template: fast, and isolated from every other test file. */
export async function cloneTemplate(name: string, template: string) {
  await withAdmin(async (c) => {
    await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
    await c.query(`CREATE DATABASE "${name}" TEMPLATE "${template}"`);
  });
  return databaseUrlFor(name);
}
