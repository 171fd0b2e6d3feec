import "@/server/server-only";
import { drizzle, type PostgresJsDatabase } from "drizzle-orm/postgres-js";
import postgres from "postgres";
import { env } from "@/env";
import * as schema from "./schema";

export { schema };
export type Db = PostgresJsDatabase<typeof schema>;
/** The handle inside `getDb().transaction(async (tx) => ...)`. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
/** Either: a query that may run inside or outside a transaction. */
export type Executor = Db | Tx;

type Handle = { sql: postgres.Sql; db: Db };
const globalForDb = globalThis as unknown as { __triskelDb?: Handle };

function open(): Handle {
  const sql = postgres(env().DATABASE_URL, {
    max: env().DATABASE_POOL_SIZE,
    idle_timeout: 30,
    connect_timeout: 5,
    onnotice: () => {},
  });
  return { sql, db: drizzle(sql, { schema }) };
}

/** The process-wide database handle (one pool per process, reused across hot reloads). */
export function getDb(): Db {
  if (!globalForDb.__triskelDb) globalForDb.__triskelDb = open();
  return globalForDb.__triskelDb.db;
}

export function getSql(): postgres.Sql {
  if (!globalForDb.__triskelDb) globalForDb.__triskelDb = open();
  return globalForDb.__triskelDb.sql;
}

export async function closeDb(): Promise<void> {
  const handle = globalForDb.__triskelDb;
  globalForDb.__triskelDb = undefined;
  if (handle) await handle.sql.end({ timeout: 5 });
}

/** Round trip to the database, for health checks; resolves with the latency in ms. */
export async function pingDb(timeoutMs = 2000): Promise<number> {
  const started = performance.now();
  await Promise.race([getSql()`select 1`, new Promise((_, reject) => setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs))]);
  return performance.now() - started;
}
