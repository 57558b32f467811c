import { hashPassword } from "better-auth/crypto";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import type { Db } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import type { AppProcess } from "@/db/cluster";

export const PASSWORD = "correct-horse-battery";

/** The test's own connection to the cluster's database (to seed people; the apps do everything else). */
export function connect(url: string): { db: Db; close: () => Promise<void> } {
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  return { db: drizzle({ client: pool, schema, casing: "snake_case" }) as unknown as Db, close: () => pool.end() };
}

export async function seed(db: Db): Promise<void> {
  await seedCatalogue(db);
}

let n = 0;
/** A verified account with a role, inserted directly. */
export async function person(db: Db, role: "member" | "moderator" | "admin") {
  n += 1;
  const id = `cl-${role}-${n}-${Math.random().toString(36).slice(2, 8)}`;
  const email = `${id}@example.org`;
  await db.insert(schema.users).values({ id, name: `Cluster ${role} ${n}`, email, emailVerified: true, role });
  await db.insert(schema.accounts).values({
    id: `acct-${id}`,
    accountId: id,
    providerId: "credential",
    userId: id,
    password: await hashPassword(PASSWORD),
  });
  return { id, email };
}

/** An HTTP call to one process, as a browser on its page would make it (Origin on changes). */
export async function http(
  app: AppProcess,
  path: string,
  opts: { method?: string; body?: unknown; cookie?: string; form?: FormData; from?: string } = {},
) {
  const method = opts.method ?? (opts.body !== undefined || opts.form ? "POST" : "GET");
  // The processes trust one proxy hop (TRUSTED_PROXY_HOPS=1), as behind the proxy of docs/operations.md: each test
  // speaks from its own address, so the per-address sign-in limit of one test does not spill into another.
  const headers: Record<string, string> = { "x-forwarded-for": opts.from ?? "192.0.2.10" };
  if (opts.cookie) headers.cookie = opts.cookie;
  if (method !== "GET") headers.origin = app.url;
  let body: BodyInit | undefined;
  if (opts.form) body = opts.form;
  else if (opts.body !== undefined) {
    headers["content-type"] = "application/json";
    body = JSON.stringify(opts.body);
  }
  const res = await fetch(`${app.url}${path}`, { method, headers, body, redirect: "manual" });
  const buf = Buffer.from(await res.arrayBuffer());
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- parsed JSON of any endpoint, read by the assertions
  let json: any = null;
  try {
    json = JSON.parse(buf.toString("utf8"));
  } catch {
    // Not JSON.
  }
  return { status: res.status, json, buf, res };
}

let addr = 0;
export async function signIn(app: AppProcess, email: string, password = PASSWORD): Promise<string> {
  addr += 1;
  const r = await http(app, "/api/auth/sign-in/email", { body: { email, password }, from: `198.51.100.${addr}` });
  if (r.status !== 200) throw new Error(`sign-in through ${app.name} failed: ${r.status} ${r.buf.toString()}`);
  return r.res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .join("; ");
}

export { reportBody } from "../support/report-body";
