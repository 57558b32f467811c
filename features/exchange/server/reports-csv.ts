import "server-only";
import crypto from "node:crypto";
import Papa from "papaparse";
import { and, asc, gt, inArray, ne, sql } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import type { Actor } from "@/features/shared/roles";
import { assertRole, authSecret } from "@/features/members/server";
import { ANECDOTAL_TEXT } from "@/features/evidence";
import { FORMULA_START } from "./csv-cells";

const { reports, reportEvents } = schema;

/** The columns of the reports CSV, export and import alike. `id` is the report's stable public id. */
export const reportColumns = [
  "id",
  "status",
  "reporter",
  "species_id",
  "species_other",
  "group_slug",
  "fish_count",
  "size_class",
  "condition_slug",
  "started_on",
  "water_volume",
  "water_volume_unit",
  "temperature",
  "temperature_unit",
  "ph",
  "setting",
  "agent_slug",
  "stock_form_id",
  "stock_percent",
  "stock_basis",
  "stock_density_g_per_ml",
  "amount_ml",
  "stated_concentration",
  "doses",
  "interval_hours",
  "other_treatments",
  "fish_lost",
  "loss_cause",
  "distress",
  "condition_outcome",
  "observed_days_after",
  "notes",
  "concentration",
  "submitted_at",
  "decided_at",
  "review_events",
] as const;

/** One entry of the `review_events` column (a JSON array): who (a pseudonym or the file's name), when, what. */
export interface ExchangedEvent {
  at: string;
  actor: string | null;
  action: string;
  from: string | null;
  to: string | null;
  note: string | null;
}

/** A stable pseudonym per member: the same member gets the same one in every export, and it reveals nothing. */
export function pseudonym(authorId: string): string {
  return `member-${crypto.createHmac("sha256", authSecret()).update(authorId).digest("hex").slice(0, 10)}`;
}

/** Papa's options for every CSV the club writes: formula-like text cells neutralised, numbers left as numbers. */
export const csvWriteOptions = { escapeFormulae: FORMULA_START, newline: "\r\n" } as const;

const EXPORT_CHUNK = 500;

/**
 * Embedded PostgreSQL runs no autovacuum, so after bulk inserts the planner still believes the reports table is
 * small and sorts the whole table for every chunk instead of walking the primary key (45 ms against 1.6 ms per
 * chunk of 20,000 reports). ANALYZE samples the table; it takes no lock that blocks reads or writes.
 */
export async function refreshPlannerStatistics(): Promise<void> {
  const db = await getDb();
  try {
    await db.execute(sql`analyze reports, report_events`);
  } catch (err) {
    // Only the planner's speed depends on it (a PostgreSQL role may lack the right): carry on without.
    console.warn("Could not refresh the planner's statistics:", err instanceof Error ? err.message : err);
  }
}

/**
 * Every submitted report (not drafts) with its review events, reporters and actors pseudonymised; the anecdotal
 * notice on the first line, in id order. Streamed: reports are read in keyset-paginated chunks as the client reads,
 * and each chunk is written with papaparse, so memory stays flat whatever the number of reports.
 */
export function exportReportsCsv(actor: Actor | null): ReadableStream<Uint8Array> {
  assertRole(actor, ["moderator", "admin"], "export reports");
  const encoder = new TextEncoder();
  let cursor: string | null = null;
  let started = false;
  const names = new Map<string, string>();
  const nameOf = (memberId: string) => names.get(memberId) ?? names.set(memberId, pseudonym(memberId)).get(memberId)!;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (!started) {
        started = true;
        await refreshPlannerStatistics();
        controller.enqueue(
          encoder.encode(`# ${ANECDOTAL_TEXT}\r\n${Papa.unparse([[...reportColumns]], csvWriteOptions)}\r\n`),
        );
        return;
      }
      const db = await getDb();
      // Keyset on the primary key: each chunk is one index range scan, however many reports there are.
      const rows = await db
        .select()
        .from(reports)
        .where(and(ne(reports.status, "draft"), cursor ? gt(reports.id, cursor) : undefined))
        .orderBy(asc(reports.id))
        .limit(EXPORT_CHUNK);
      if (!rows.length) {
        controller.close();
        return;
      }
      cursor = rows[rows.length - 1]!.id;
      const events = await db
        .select()
        .from(reportEvents)
        .where(
          inArray(
            reportEvents.reportId,
            rows.map((r) => r.id),
          ),
        )
        .orderBy(asc(reportEvents.reportId), asc(reportEvents.at), asc(reportEvents.id));
      const byReport = new Map<string, ExchangedEvent[]>();
      for (const e of events) {
        const list = byReport.get(e.reportId) ?? [];
        list.push({
          at: e.at.toISOString(),
          actor: e.actorName ?? (e.actorId ? nameOf(e.actorId) : null),
          action: e.action,
          from: e.fromStatus,
          to: e.toStatus,
          note: e.note,
        });
        byReport.set(e.reportId, list);
      }
      const data = rows.map((r) => {
        const d: Record<(typeof reportColumns)[number], unknown> = {
          id: r.id,
          status: r.status,
          reporter: r.externalReporter ?? nameOf(r.authorId),
          species_id: r.speciesId,
          species_other: r.speciesOther,
          group_slug: r.groupSlug,
          fish_count: r.fishCount,
          size_class: r.sizeClass,
          condition_slug: r.conditionSlug,
          started_on: r.startedOn,
          water_volume: r.waterVolume,
          water_volume_unit: r.waterVolumeUnit,
          temperature: r.temperature,
          temperature_unit: r.temperatureUnit,
          ph: r.ph,
          setting: r.setting,
          agent_slug: r.agentSlug,
          stock_form_id: r.stockFormId,
          stock_percent: r.stockPercent,
          stock_basis: r.stockBasis,
          stock_density_g_per_ml: r.stockDensityGPerMl,
          amount_ml: r.amountMl,
          stated_concentration: r.statedConcentration,
          doses: r.doses,
          interval_hours: r.intervalHours,
          other_treatments: r.otherTreatments,
          fish_lost: r.fishLost,
          loss_cause: r.lossCause,
          distress: r.distress,
          condition_outcome: r.conditionOutcome,
          observed_days_after: r.observedDaysAfter,
          notes: r.notes,
          concentration: r.concentration,
          submitted_at: r.submittedAt?.toISOString() ?? null,
          decided_at: r.decidedAt?.toISOString() ?? null,
          review_events: JSON.stringify(byReport.get(r.id) ?? []),
        };
        return reportColumns.map((c) => d[c] ?? "");
      });
      controller.enqueue(encoder.encode(`${Papa.unparse(data, csvWriteOptions)}\r\n`));
    },
  });
}
