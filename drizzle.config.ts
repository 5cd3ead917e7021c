import { defineConfig } from "drizzle-kit";
import { developmentDatabaseUrl } from "./scripts/lib/database-url";

export default defineConfig({
  dialect: "postgresql",
  schema: "./app/db/schema/index.ts",
  out: "./drizzle",
  dbCredentials: { url: developmentDatabaseUrl() },
  strict: true,
});
