import { defineConfig } from "drizzle-kit";

// Migrations are generated from lib/db/schema.ts (`npm run db:generate`) and applied at start-up by
// scripts/lib/migrate.ts; drizzle-kit push/pull are not used (they fail on json columns on MariaDB).
export default defineConfig({
  dialect: "mysql",
  schema: ["./lib/db/schema.ts", "./lib/db/schema-datasets.ts", "./lib/db/schema-billing.ts"],
  out: "./drizzle",
  dbCredentials: { url: process.env.DATABASE_URL ?? "mysql://sumfold@127.0.0.1:3316/sumfold" },
});
