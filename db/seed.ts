import { pathToFileURL } from "node:url";
import { and, eq, inArray } from "drizzle-orm";
import { hashPassword } from "better-auth/crypto";
import { closeDb, getDb, schema, type Db } from "./client";
import { seedCatalogue, speciesIdOf } from "@/features/catalogue/server";
import { starterAgents, starterSpecies } from "@/features/catalogue/starter-data";
import {
  concentrationFromMl,
  doseMlForTarget,
  stockMgPerMl,
  toCelsius,
  toLitres,
  type VolumeUnit,
} from "@/features/dosing";
import { DEFAULT_DEMO_PASSWORD, DEMO_CLUB_NAME, demoPeople, demoPeroxideTolerance, prng } from "./demo-data";
import type { ReportStatus } from "./schema";
import { drainEvidenceOutbox } from "@/features/evidence/server";
import { enqueueEvidenceRecompute } from "@/features/shared/server/evidence-outbox";
import { computeFlags } from "@/features/reports/server";

const { users, accounts, reports, reportEvents, clubSettings } = schema;

export interface SeedOptions {
  password?: string;
  reports?: boolean;
}

export interface SeedResult {
  password: string;
  accounts: { email: string; name: string; role: string }[];
  reportsCreated: number;
}

/** Seeds the catalogue and the invented demo club. Safe to run again: it adds nothing twice. */
export async function seedDemo(db: Db, opts: SeedOptions = {}): Promise<SeedResult> {
  const password = opts.password || DEFAULT_DEMO_PASSWORD;
  await seedCatalogue(db);
  await db.update(clubSettings).set({ name: DEMO_CLUB_NAME }).where(eq(clubSettings.id, 1));
  const ids = await seedPeople(db, password);
  let created = 0;
  if (opts.reports !== false) created = await seedReports(db, ids);
  // Only what changed: the demo reports' pairs were queued with them (so a run stopped before this line leaves them
  // queued, not lost); a second run with nothing new drains an empty outbox instead of recomputing every summary.
  await drainEvidenceOutbox({ db });
  return {
    password,
    accounts: demoPeople.map(({ email, name, role }) => ({ email, name, role })),
    reportsCreated: created,
  };
}

async function seedPeople(db: Db, password: string): Promise<Map<string, string>> {
  const now = new Date();
  for (const p of demoPeople) {
    const id = `demo-${p.email.split("@")[0]}`;
    await db
      .insert(users)
      .values({
        id,
        name: p.name,
        email: p.email,
        emailVerified: true,
        role: p.role,
        isDemo: true,
        createdAt: now,
        updatedAt: now,
      })
      .onConflictDoNothing();
  }
  const rows = await db
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(
      inArray(
        users.email,
        demoPeople.map((p) => p.email),
      ),
    );
  const byEmail = new Map(rows.map((r) => [r.email, r.id]));
  // The demo password is whatever this run was given, so the printed password always works.
  for (const [, userId] of byEmail) {
    const hash = await hashPassword(password);
    const [existing] = await db
      .select({ id: accounts.id })
      .from(accounts)
      .where(and(eq(accounts.userId, userId), eq(accounts.providerId, "credential")));
    if (existing) await db.update(accounts).set({ password: hash, updatedAt: now }).where(eq(accounts.id, existing.id));
    else
      await db
        .insert(accounts)
        .values({ id: `acct-${userId}`, accountId: userId, providerId: "credential", userId, password: hash });
  }
  return byEmail;
}

const statusPlan: [ReportStatus, number][] = [
  ["accepted", 110],
  ["awaiting_review", 14],
  ["draft", 10],
  ["declined", 6],
  ["returned", 5],
  ["retracted", 5],
];

async function seedReports(db: Db, ids: Map<string, string>): Promise<number> {
  const [any] = await db.select({ id: reports.id }).from(reports).where(eq(reports.source, "demo")).limit(1);
  if (any) return 0;
  const rand = prng(20261201);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rand() * xs.length)]!;
  const authors = demoPeople
    .filter((p) => p.email !== "admin@example.org")
    .map((p) => ({ ...p, id: ids.get(p.email)! }));
  const moderators = demoPeople.filter((p) => p.role === "moderator").map((p) => ids.get(p.email)!);
  const agentBySlug = new Map(starterAgents.map((a) => [a.slug, a]));
  const otherAgents = ["copper", "salt", "formaldehyde", "methylene-blue", "potassium-permanganate"];
  const statuses = statusPlan.flatMap(([s, n]) => Array<ReportStatus>(n).fill(s));
  const reportRows: (typeof reports.$inferInsert)[] = [];
  const eventRows: (typeof reportEvents.$inferInsert)[] = [];
  const today = Date.UTC(2026, 10, 20);

  statuses.forEach((status, i) => {
    // Shuffle statuses over the sequence deterministically.
    const author = authors[i % authors.length]!;
    // Most club reports concern a few popular groups, so their summaries have shape.
    const popular = ["livebearers", "tetras", "corydoras", "african-cichlids", "goldfish-koi", "anabantoids"];
    const sp = rand() < 0.6 ? pick(starterSpecies.filter((x) => popular.includes(x.group))) : pick(starterSpecies);
    const agentSlug = rand() < 0.7 ? "hydrogen-peroxide" : pick(otherAgents);
    const agent = agentBySlug.get(agentSlug)!;
    const stock = agentSlug === "hydrogen-peroxide" && rand() < 0.8 ? agent.stocks[0]! : pick(agent.stocks);
    const mgPerMl = stockMgPerMl(stock);
    const volumeUnit: VolumeUnit = rand() < 0.8 ? "L" : "gal_us";
    const volume = volumeUnit === "L" ? Math.round(20 + rand() * 180) : Math.round(5 + rand() * 45);
    const volumeL = toLitres(volume, volumeUnit);
    const tol = demoPeroxideTolerance[sp.group] ?? 40;
    const span = agent.bandEdges[agent.bandEdges.length - 1]!;
    const scale = agentSlug === "hydrogen-peroxide" ? 1 : span / 80;
    const target = (12 + rand() * 70) * scale;
    const amountMl = Math.max(0.5, Math.round(doseMlForTarget(target, volumeL, mgPerMl, agent.unit) * 2) / 2);
    const dose = concentrationFromMl(amountMl, volumeL, mgPerMl, agent.unit);
    const t = tol * scale;
    const pAdverse = 1 / (1 + Math.exp(-(dose - t) / (0.12 * t)));
    const adverse = rand() < pAdverse;
    const fishCount = 1 + Math.floor(rand() * 12);
    let fishLost = 0;
    let lossCause: string | null = null;
    let distress = rand() < 0.7 ? "none" : "mild";
    if (adverse) {
      if (rand() < 0.6) {
        fishLost = 1 + Math.floor(rand() * Math.min(fishCount, 4));
        lossCause = rand() < 0.75 ? "treatment" : "unknown";
      }
      distress = fishLost > 0 && rand() < 0.3 ? "mild" : "severe";
    } else if (rand() < 0.1 && fishCount > 1) {
      fishLost = 1;
      lossCause = "disease";
    }
    const pCleared = Math.min(0.9, 0.25 + 0.55 * Math.min(1, dose / t));
    const outcomeRoll = rand();
    const conditionOutcome =
      outcomeRoll < pCleared
        ? "cleared"
        : outcomeRoll < pCleared + 0.15
          ? "improved"
          : outcomeRoll < 0.95
            ? "unchanged"
            : "worse";
    const startedMs = today - Math.floor(rand() * 700) * 86400000;
    const startedOn = new Date(startedMs).toISOString().slice(0, 10);
    const temperatureUnit = volumeUnit === "gal_us" ? "F" : "C";
    const tempC = 22 + Math.round(rand() * 8);
    const temperature = temperatureUnit === "F" ? Math.round((tempC * 9) / 5 + 32) : tempC;
    const doses = agent.redoseHours ? 1 + Math.floor(rand() * 4) : 1;
    const off = status === "awaiting_review" && i % 5 === 0;
    const id = `demo-${String(i + 1).padStart(3, "0")}`;
    const created = new Date(startedMs + 86400000 * (7 + doses * 2));
    const submitted = new Date(created.getTime() + 3600000);
    const decided = new Date(submitted.getTime() + 86400000 * (1 + Math.floor(rand() * 4)));
    const ph = rand() < 0.6 ? Math.round((6.2 + rand() * 1.8) * 10) / 10 : null;
    reportRows.push({
      id,
      authorId: author.id,
      status,
      source: "demo",
      speciesId: speciesIdOf(sp.scientificName),
      groupSlug: sp.group,
      fishCount,
      sizeClass: pick(["juvenile", "subadult", "adult", "adult"]),
      conditionSlug:
        agentSlug === "salt"
          ? pick(["white-spot", "none-preventive", "fin-rot"])
          : pick([
              "white-spot",
              "gill-flukes",
              "skin-flukes",
              "ichthyobodo",
              "trichodina",
              "columnaris",
              "none-preventive",
            ]),
      startedOn,
      waterVolume: volume,
      waterVolumeUnit: volumeUnit,
      volumeL,
      temperature,
      temperatureUnit,
      temperatureC: toCelsius(temperature, temperatureUnit),
      ph,
      setting: pick(["bare", "bare", "planted", "other"]),
      agentSlug,
      stockFormId: stock.id,
      stockPercent: stock.percent,
      stockBasis: stock.basis,
      stockDensityGPerMl: stock.densityGPerMl,
      stockActiveFraction: stock.activeFraction ?? 1,
      amountMl,
      statedConcentration: off
        ? Math.round(dose * 1.3 * 10) / 10
        : rand() < 0.4
          ? Math.round(dose) || Number(dose.toPrecision(1))
          : null, // never 0: the report schema needs > 0
      doses,
      intervalHours: doses > 1 ? agent.redoseHours : null,
      otherTreatments: null,
      fishLost,
      lossCause,
      distress,
      conditionOutcome,
      observedDaysAfter: 5 + Math.floor(rand() * 14),
      notes: `Demo report (invented data). ${adverse ? "Fish showed stress after dosing." : "Fish came through the course."}`,
      showName: rand() < 0.5,
      concentration: dose,
      createdAt: created,
      updatedAt: status === "draft" ? created : decided,
      submittedAt: status === "draft" ? null : submitted,
      decidedAt: ["draft", "awaiting_review"].includes(status) ? null : decided,
    });
    const mod = moderators.find((m) => m !== author.id) ?? moderators[0]!;
    eventRows.push({
      reportId: id,
      actorId: author.id,
      action: "created",
      fromStatus: null,
      toStatus: "draft",
      at: created,
    });
    if (status === "draft") return;
    eventRows.push({
      reportId: id,
      actorId: author.id,
      action: "submitted",
      fromStatus: "draft",
      toStatus: "awaiting_review",
      at: submitted,
    });
    if (status === "awaiting_review") return;
    const decision = { accepted: "accept", retracted: "accept", returned: "return", declined: "decline" }[
      status as string
    ]!;
    const to = status === "retracted" ? "accepted" : status;
    const note =
      {
        accept: null,
        return: "Please add the stock strength you used and how many days you watched.",
        decline: "Duplicate of an earlier report of the same course.",
      }[decision] ?? null;
    eventRows.push({
      reportId: id,
      actorId: mod,
      action: decision,
      fromStatus: "awaiting_review",
      toStatus: to,
      note,
      at: decided,
    });
    if (status === "retracted") {
      eventRows.push({
        reportId: id,
        actorId: mod,
        action: "retract",
        fromStatus: "accepted",
        toStatus: "retracted",
        note: "Entered twice by mistake.",
        at: new Date(decided.getTime() + 86400000 * 10),
      });
    }
  });

  await db.transaction(async (tx) => {
    await tx.insert(reports).values(reportRows);
    await tx.insert(reportEvents).values(eventRows);
    await enqueueEvidenceRecompute(
      tx,
      reportRows
        .filter((r) => r.status === "accepted")
        .map((r) => ({ groupSlug: r.groupSlug, agentSlug: r.agentSlug })),
    );
  });
  // Reports awaiting review carry the flags the server computes on submission, like any other.
  const waiting = await db
    .select()
    .from(reports)
    .where(and(eq(reports.source, "demo"), eq(reports.status, "awaiting_review")));
  for (const row of waiting) {
    const { flags, completeness } = await computeFlags(db, row);
    await db.update(reports).set({ flags, completeness }).where(eq(reports.id, row.id));
  }
  return reportRows.length;
}

async function main() {
  const db = await getDb();
  const result = await seedDemo(db, { password: process.env.DEMO_PASSWORD, reports: process.env.DEMO_REPORTS !== "0" });
  await closeDb();
  console.log(`Seeded the demo club: ${result.accounts.length} accounts, ${result.reportsCreated} new reports.`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  main().catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
}
