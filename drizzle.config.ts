import { defineConfig } from "drizzle-kit";

// Generates SQL migrations from the schema; the app applies them itself on start (db/client.ts).
export default defineConfig({
  dialect: "postgresql",
  schema: "./db/schema/index.ts",
  out: "./drizzle",
  casing: "snake_case",
});
