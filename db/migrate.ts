import { closeDb, getDbKind } from "./client";

// Opening the database applies every pending migration in drizzle/.
const kind = await getDbKind();
await closeDb();
console.log(`Migrations applied (${kind}).`);
