// Seeds a bench club straight into the database: the catalogue, three members who can sign in (admin, moderator,
// member), 300 authors, and N accepted hydrogen peroxide reports over 15 groups, written by INSERT … SELECT over
// generate_series in chunks (one statement per chunk, no row-by-row round trips).
//
// Every per-row value comes from the row number i as a bigint, so no product overflows at any N (i * 7919 passes
// 2³¹ near i = 271,000 as an int: the old bench's "integer out of range" at 300,000). Pseudo-random draws use
// hashint8 (a built-in PostgreSQL hash, also in PGlite), so a run is deterministic without random().
//
// Outcomes follow a known logistic curve in log10 dose per group (the bench's fits then do their full work:
// estimates, profile limits, curve), with the group's dose at 50 % risk between 40 and 96 mg/L.
import { hashPassword } from "better-auth/crypto";
import { sql } from "drizzle-orm";
import type { Db } from "@/db/client";

export const BENCH_PASSWORD = "bench-password-not-secret";
export const benchPeople = [
  { id: "bench-admin", email: "bench-admin@example.org", name: "Bench admin", role: "admin" },
  { id: "bench-moderator", email: "bench-moderator@example.org", name: "Bench moderator", role: "moderator" },
  { id: "bench-member", email: "bench-member@example.org", name: "Bench member", role: "member" },
] as const;

const CHUNK = 100_000;

export async function seedBench(db: Db, reports: number, log: (s: string) => void): Promise<void> {
  const { seedCatalogue } = await import("@/features/catalogue/server");
  await seedCatalogue(db);
  const hash = await hashPassword(BENCH_PASSWORD);
  for (const p of benchPeople) {
    await db.execute(
      sql`insert into users (id, name, email, email_verified, role) values (${p.id}, ${p.name}, ${p.email}, true, ${p.role})`,
    );
    await db.execute(
      sql`insert into accounts (id, account_id, provider_id, user_id, password) values (${`acct-${p.id}`}, ${p.id}, 'credential', ${p.id}, ${hash})`,
    );
  }
  await db.execute(sql`insert into users (id, name, email, email_verified, role)
    select 'bench-' || i, 'Bench author ' || i, 'bench' || i || '@example.org', true, 'member' from generate_series(1, 300) i`);
  for (let lo = 1; lo <= reports; lo += CHUNK) {
    const hi = Math.min(reports, lo + CHUNK - 1);
    const t = performance.now();
    await db.execute(insertChunk(lo, hi));
    // As the app's own bulk writes do: single-user PostgreSQL writes its WAL out only on CHECKPOINT.
    await db.execute(sql`checkpoint`);
    log(`  seeded reports ${lo}–${hi} in ${((performance.now() - t) / 1000).toFixed(1)} s`);
  }
}

function insertChunk(lo: number, hi: number) {
  // u1, u2: two independent uniforms in [0, 1) per row. dose: 851 distinct values 5.0–90.0 mg/L. All float8:
  // numeric exp/log cost milliseconds a row.
  // Risk: logit = 6·log10(dose / d50) with d50 = 40 + 4·(k − 1) mg/L for the k-th group.
  return sql`
    with g as (select slug, row_number() over (order by slug) as k from species_groups),
         s as (select id, group_slug, row_number() over (partition by group_slug order by id) as k, count(*) over (partition by group_slug) as n from species),
         x as (select i,
                      (hashint8(i)::float8 + 2147483648) / 4294967296 as u1,
                      (hashint8(i + 1000000007)::float8 + 2147483648) / 4294967296 as u2,
                      5 + ((i * 7919) % 851)::float8 / 10 as dose
                 from generate_series(${lo}::bigint, ${hi}::bigint) i),
         y as (select x.*, g.slug as group_slug, s.id as species_id,
                      x.u1 < 1 / (1 + exp(-6 * log(x.dose / (40 + 4 * (g.k - 1))::float8))) as adverse
                 from x
                 join g on g.k = 1 + x.i % 15
                 join s on s.group_slug = g.slug and s.k = 1 + (x.i / 15) % s.n)
    insert into reports (id, author_id, status, source, species_id, group_slug, fish_count, size_class, condition_slug, started_on,
                         water_volume, water_volume_unit, volume_l, temperature, temperature_unit, temperature_c, setting,
                         agent_slug, stock_percent, stock_basis, amount_ml, doses, fish_lost, loss_cause, distress, condition_outcome,
                         observed_days_after, show_name, concentration, submitted_at, decided_at)
    select 'b' || i, 'bench-' || (1 + i % 300), 'accepted', 'demo', species_id, group_slug, 1 + i % 9, 'adult',
           (array['white-spot','gill-flukes','skin-flukes','ichthyobodo','none-preventive'])[1 + i % 5], date '2025-01-01' + (i % 600)::int,
           100, 'L', 100, 25, 'C', 25, 'bare', 'hydrogen-peroxide', 3, 'w/v', dose * 100 / 30, 1,
           case when adverse and u2 < 0.6 then 1 else 0 end, case when adverse and u2 < 0.6 then 'treatment' end,
           case when adverse and u2 >= 0.6 then 'severe' else 'mild' end,
           case when u2 < 0.45 then 'cleared' when u2 < 0.8 then 'improved' else 'unchanged' end,
           7, false, dose, now(), now()
      from y`;
}
