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
