import "server-only";
import { drizzle, type MySql2Database } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import * as schema from "./schema";

export type Db = MySql2Database<typeof schema>;

// One pool per process, kept on globalThis so dev reloads do not open new pools.
const g = globalThis as unknown as { __sumfoldPool?: mysql.Pool; __sumfoldDb?: Db };

export function getPool(): mysql.Pool {
  if (!g.__sumfoldPool) {
    const uri = process.env.DATABASE_URL;
    if (!uri) throw new Error("DATABASE_URL is not set");
    g.__sumfoldPool = mysql.createPool({
      uri,
      connectionLimit: 10,
      connectTimeout: 2000,
      enableKeepAlive: true,
      dateStrings: false,
      timezone: "Z",
    });
  }
  return g.__sumfoldPool;
}

export function getDb(): Db {
  if (!g.__sumfoldDb) g.__sumfoldDb = drizzle(getPool(), { schema, mode: "default" });
  return g.__sumfoldDb;
}

/**
 * How long a request waits for the database before answering 503. mysql2 has no acquire or query timeout of its
 * own, and a paused server keeps its TCP connections open, so every request-path query races this deadline.
 */
export const DB_DEADLINE_MS = 1500;

export class DbUnavailableError extends Error {
  constructor(message = `the database did not answer within ${DB_DEADLINE_MS} ms`) {
    super(message);
    this.name = "DbUnavailableError";
  }
}

/** Resolves like `p`, or rejects with DbUnavailableError once `ms` pass (the query itself is left to finish). */
export async function withDbDeadline<T>(p: Promise<T>, ms = DB_DEADLINE_MS): Promise<T> {
  let t: NodeJS.Timeout | undefined;
  try {
    return await Promise.race([p, new Promise<never>((_, reject) => (t = setTimeout(() => reject(new DbUnavailableError()), ms)))]);
  } finally {
    clearTimeout(t);
  }
}
