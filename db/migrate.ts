import { migrate } from "drizzle-orm/node-postgres/migrator";
import { getDb, pool } from "./index";

async function main() {
  await migrate(getDb(), { migrationsFolder: "./drizzle" });
  await pool().end();
  console.log("migrations applied");
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
