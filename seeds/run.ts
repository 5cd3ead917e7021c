/** `npm run seed`: migrate the development database and add the demo scenario if it is missing. */
import { createDatabase, createPool } from "~/server/db.server";
import { migrateDatabase } from "~/server/migrate.server";
import { developmentDatabaseUrl } from "../scripts/lib/database-url";
import { ensureDatabases } from "../scripts/lib/postgres";
import { seedDemo } from "./seed-demo";

await ensureDatabases();
await migrateDatabase(developmentDatabaseUrl());
const pool = createPool();
try {
  console.log(`Demo scenario: ${await seedDemo(createDatabase(pool))}.`);
} finally {
  await pool.end();
}
