import crypto from "node:crypto";
import Papa from "papaparse";
import { z } from "zod";
import { inArray, sql } from "drizzle-orm";
import { checkpointEmbedded, getDb, schema, type Db } from "@/db/client";
import { AppError, type FieldIssue } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { zodIssues } from "@/features/shared/server/http";
import { assertRole } from "@/features/members/server";
import { reportInputSchema, reportStatuses, type ReportInput } from "@/features/reports";
import { derive, type ReportRow } from "@/features/reports/server";
import { enqueueEvidenceRecompute, wakeEvidenceWorker } from "@/features/shared/server/evidence-outbox";
import { drainEvidenceOutbox } from "@/features/evidence/server";
import { canonicalJson } from "@/features/shared/server/idempotency";
import { controlCharacterIn, unneutralise } from "./csv-cells";
import { refreshPlannerStatistics, type ExchangedEvent } from "./reports-csv";

const { reports, reportEvents } = schema;
type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export const MAX_IMPORT_ROWS = 20_000;
/** Rows per write transaction: small enough that other requests wait at most a moment for the database. */
export const IMPORT_BATCH = 250;
const CHECK_CHUNK = 500;
const CHECK_YIELD_EVERY = 25;
/** Reports per INSERT statement within a batch's transaction. */
const INSERT_ROWS = 50;

type Pair = { groupSlug: string | null; agentSlug: string | null };

export interface ImportResult {
  imported: number;
  skipped: number;
  rejected: { row: number; issues: FieldIssue[] }[];
  /** Accepted group × agent pairs the import changed (what the evidence recomputes). */
  touched: Pair[];
  dryRun: boolean;
}

export interface ImportProgress {
  phase: "checking" | "writing";
  done: number;
  total: number;
}

export interface ImportOptions {
  /** Check and count only; write nothing. */
  dryRun?: boolean;
  /** Import the good rows of a file that has rejected ones (otherwise such a file imports nothing). */
  partial?: boolean;
  onProgress?: (p: ImportProgress) => void;
}

/** A file with rejected rows, sent without ?partial=1: nothing was imported. 422 with the counts beside the envelope. */
export class ImportRefused extends AppError {
  constructor(readonly result: ImportResult) {
    const n = result.rejected.length;
    super(
      "invalid",
      `${n} row${n === 1 ? "" : "s"} need${n === 1 ? "s" : ""} fixing, so nothing was imported. Fix them, or import with ?partial=1 to keep the good rows and leave those out.`,
      result.rejected
        .slice(0, 100)
        .flatMap((r) => r.issues.map((i) => ({ path: `row ${r.row}: ${i.path}`, message: i.message }))),
    );
  }
  override toBody() {
    const { imported, skipped, rejected } = this.result;
    return { ...super.toBody(), imported, skipped, rejected };
  }
}

const num = (v: string | undefined) => (v === undefined || v.trim() === "" ? undefined : Number(v));
const str = (v: string | undefined) => (v === undefined || v.trim() === "" ? undefined : v.trim());

function rowToInput(r: Record<string, string>) {
  return {
    speciesId: str(r.species_id) ?? null,
    ...(str(r.species_other) ? { speciesOther: str(r.species_other) } : {}),
    fishCount: num(r.fish_count),
    sizeClass: str(r.size_class),
    conditionSlug: str(r.condition_slug),
    startedOn: str(r.started_on),
    water: {
      volume: num(r.water_volume),
      volumeUnit: str(r.water_volume_unit),
      temperature: num(r.temperature),
      temperatureUnit: str(r.temperature_unit),
      ph: num(r.ph),
      setting: str(r.setting),
    },
    treatment: {
      agentSlug: str(r.agent_slug),
      stockFormId: str(r.stock_form_id) ?? null,
      stockPercent: num(r.stock_percent),
      stockBasis: str(r.stock_basis),
      stockDensityGPerMl: num(r.stock_density_g_per_ml),
      amountMl: num(r.amount_ml),
      statedConcentration: num(r.stated_concentration),
      doses: num(r.doses),
      intervalHours: num(r.interval_hours),
      otherTreatments: str(r.other_treatments),
    },
    outcome: {
      fishLost: num(r.fish_lost),
      lossCause: str(r.loss_cause) ?? null,
      distress: str(r.distress),
      condition: str(r.condition_outcome),
      observedDaysAfter: num(r.observed_days_after),
      notes: str(r.notes),
    },
    showName: false,
  };
}

/** The report's columns from a checked input (what the API would store), before the server's derived values. */
function toColumns(i: ReportInput) {
  return {
    speciesId: i.speciesId,
    speciesOther: i.speciesOther ?? null,
    fishCount: i.fishCount,
    sizeClass: i.sizeClass,
    conditionSlug: i.conditionSlug,
    startedOn: i.startedOn,
    waterVolume: i.water.volume,
    waterVolumeUnit: i.water.volumeUnit,
    temperature: i.water.temperature,
    temperatureUnit: i.water.temperatureUnit,
    ph: i.water.ph ?? null,
    setting: i.water.setting,
    agentSlug: i.treatment.agentSlug,
    stockFormId: i.treatment.stockFormId ?? null,
    stockPercent: i.treatment.stockPercent ?? null,
    stockBasis: i.treatment.stockBasis ?? null,
    stockDensityGPerMl: i.treatment.stockDensityGPerMl ?? null,
    amountMl: i.treatment.amountMl ?? null,
    statedConcentration: i.treatment.statedConcentration ?? null,
    doses: i.treatment.doses,
    intervalHours: i.treatment.intervalHours ?? null,
    otherTreatments: i.treatment.otherTreatments ?? null,
    fishLost: i.outcome.fishLost,
    lossCause: i.outcome.lossCause,
    distress: i.outcome.distress,
    conditionOutcome: i.outcome.condition,
    observedDaysAfter: i.outcome.observedDaysAfter,
    notes: i.outcome.notes ?? null,
  };
}

/** The content fingerprint: the normalised report (key order ignored) and its reporter. Status and history are not content. */
function fingerprint(input: ReportInput, reporter: string | null): string {
  const { showName: _s, submit: _u, ...content } = input;
  return crypto
    .createHash("sha256")
    .update(`${canonicalJson(content)}\n${(reporter ?? "").toLowerCase()}`)
    .digest("hex");
}

const importStatuses = reportStatuses.filter((s) => s !== "draft");
const isoTime = z.iso.datetime({ offset: true });
const statusOrNull = z.enum(reportStatuses).nullable();
const eventsSchema = z
  .array(
    z
      .object({
        at: isoTime,
        actor: z.string().max(100).nullable(),
        action: z.string().regex(/^[a-z_]{1,40}$/, "action must be lower-case letters and _ (for example accepted)."),
        from: statusOrNull,
        to: statusOrNull,
        note: z.string().max(4000).nullable(),
      })
      .strict(),
  )
  .max(500);

/** A report id the import can honour: a UUID (every report filed here) or another short, plain id (the demo's). */
const ID = /^[A-Za-z0-9][A-Za-z0-9_-]{0,63}$/;

interface GoodRow {
  row: number;
  id: string;
  hadId: boolean;
  fingerprint: string;
  status: (typeof importStatuses)[number];
  reporter: string | null;
  /** What the reports table stores: the checked fields and the server's derived values. */
  columns: Awaited<ReturnType<typeof derive>>;
  submittedAt: Date;
  decidedAt: Date | null;
  events: ExchangedEvent[];
}

export interface PreparedImport {
  actor: Actor;
  rows: Record<string, string>[];
  /** Row numbers (as in the answer) whose cell count differs from the header. */
  ragged: Map<number, string>;
}

const breathe = () => new Promise<void>((resolve) => setImmediate(resolve));

/** Records per slice of the file parsed at once: a few milliseconds of work between two turns of the event loop. */
const PARSE_SLICE_RECORDS = 500;

/**
 * Where each record of a CSV text ends, found the way a CSV reader does: a line break inside double quotes belongs to
 * the field; a line starting with # is a comment to its end (quotes in it count for nothing). Returns the offset just
 * past each record's line break (the last record may end at the text's end without one).
 */
function recordEnds(text: string): number[] {
  const ends: number[] = [];
  let i = 0;
  const n = text.length;
  while (i < n) {
    if (text.charCodeAt(i) === 35 /* # */) {
      const nl = text.indexOf("\n", i);
      i = nl < 0 ? n : nl + 1;
      ends.push(i);
      continue;
    }
    let quoted = false;
    for (; i < n; i++) {
      const c = text.charCodeAt(i);
      if (c === 34 /* " */) quoted = !quoted;
      else if (c === 10 /* \n */ && !quoted) break;
    }
    i = Math.min(i + 1, n);
    ends.push(i);
  }
  return ends;
}

/**
 * Reads the file: refuses (422, nothing changed) one that is not CSV with the needed columns or is too long.
 * Row numbers count the header as row 1 (comment lines starting with # are not counted).
 *
 * The file is parsed in slices of PARSE_SLICE_RECORDS records, each behind the header line, handing the event loop
 * back between slices: one parse of a 20,000-row file holds the server for hundreds of milliseconds.
 */
export async function prepareReportsImport(actor: Actor | null, text: string): Promise<PreparedImport> {
  assertRole(actor, ["admin"], "import reports");
  const ends = recordEnds(text);
  // The header is the first record that is neither a comment nor blank.
  let h = 0;
  let from = 0;
  for (; h < ends.length; h++) {
    const rec = text.slice(from, ends[h]);
    if (!rec.startsWith("#") && rec.trim() !== "") break;
    from = ends[h]!;
  }
  if (h >= ends.length)
    throw new AppError("invalid", "The file is empty; send the header line and rows of the reports export.", [
      { path: "file", message: "No header line was found." },
    ]);
  const headerText = text.slice(from, ends[h]);
  const headerLine = /\n$/.test(headerText) ? headerText : `${headerText}\n`;
  const data: Record<string, string>[] = [];
  const ragged = new Map<number, string>();
  let fields: string[] = [];
  let delimiter: string | undefined;
  for (let k = h + 1, first = true; first || k < ends.length; k += PARSE_SLICE_RECORDS, first = false) {
    const sliceEnd = ends[Math.min(k + PARSE_SLICE_RECORDS, ends.length) - 1];
    const body = k < ends.length ? text.slice(ends[k - 1], sliceEnd) : "";
    const parsed = Papa.parse<Record<string, string>>(headerLine + body, {
      header: true,
      comments: "#",
      skipEmptyLines: "greedy",
      transformHeader: (x) => x.trim(),
      ...(delimiter ? { delimiter } : {}),
    });
    delimiter ??= parsed.meta.delimiter;
    const fatal = parsed.errors.find((e) => e.type === "Delimiter" || e.type === "Quotes");
    if (fatal) {
      // papaparse numbers an unclosed quote's row one past its data index (it counts the row it gave up on).
      const index = fatal.type === "Quotes" && fatal.row ? fatal.row - 1 : (fatal.row ?? 0);
      throw new AppError(
        "bad_request",
        `The file could not be read as CSV (${fatal.message}, row ${data.length + index + 2}).`,
      );
    }
    if (first) {
      fields = parsed.meta.fields ?? [];
      const missing = ["fish_count", "agent_slug", "started_on"].filter((c) => !fields.includes(c));
      if (missing.length)
        throw new AppError(
          "invalid",
          "The file lacks required columns; use the columns of the reports export.",
          missing.map((m) => ({ path: m, message: `Column ${m} is missing.` })),
        );
    }
    for (const e of parsed.errors)
      if (e.type === "FieldMismatch" && e.row !== undefined) ragged.set(data.length + e.row + 2, e.message);
    for (const row of parsed.data) data.push(row);
    if (data.length > MAX_IMPORT_ROWS)
      throw new AppError(
        "too_large",
        `At most ${MAX_IMPORT_ROWS.toLocaleString("en")} rows per import; split the file.`,
      );
    await breathe();
  }
  return { actor: actor, rows: data, ragged };
}

// Fields derive() never reads (outcome, description): left out of its cache key. Any other field, including one
// added later, is part of the key, so a cached answer is always derive()'s own for the same inputs.
const NOT_DERIVED = new Set([
  "fishCount",
  "sizeClass",
  "conditionSlug",
  "startedOn",
  "ph",
  "setting",
  "doses",
  "intervalHours",
  "otherTreatments",
  "fishLost",
  "lossCause",
  "distress",
  "conditionOutcome",
  "observedDaysAfter",
  "notes",
]);
type DeriveCache = Map<string, ReturnType<typeof derive>>;

/**
 * derive() once per distinct set of inputs within an import: it looks up the catalogue (species, agent, stock
 * presets) for every call, and a file's rows mostly repeat a few tanks, species and stocks.
 */
function deriveCached(db: Db, cache: DeriveCache, columns: ReturnType<typeof toColumns>): ReturnType<typeof derive> {
  const key = JSON.stringify(Object.entries(columns).filter(([k]) => !NOT_DERIVED.has(k)));
  let hit = cache.get(key);
  if (!hit) {
    hit = derive(db, { ...columns, groupSlug: null } as ReportRow);
    hit.catch(() => {}); // awaited by each row that uses it; no unhandled rejection meanwhile
    cache.set(key, hit);
  }
  return hit.then((d) => ({ ...d }));
}

/** Checks one row; returns its issues, or the row ready to write. */
async function checkRow(
  db: Db,
  raw: Record<string, string>,
  row: number,
  known: { species: Set<string>; conditions: Set<string>; agents: Set<string> },
  ragged: string | undefined,
  cache: DeriveCache,
): Promise<{ issues: FieldIssue[] } | { good: Omit<GoodRow, "id" | "hadId"> & { id: string | undefined } }> {
  const issues: FieldIssue[] = [];
  if (ragged) issues.push({ path: "(row)", message: `${ragged}; every row needs the header's columns.` });
  const r: Record<string, string> = {};
  for (const [column, value] of Object.entries(raw)) {
    if (typeof value !== "string") continue; // extra cells beyond the header (reported as ragged above)
    const control = controlCharacterIn(value);
    if (control) issues.push({ path: column, message: `Contains a control character (${control}); remove it.` });
    r[column] = unneutralise(value);
  }
  if (issues.length) return { issues };

  const id = str(r.id);
  if (id !== undefined && !ID.test(id))
    issues.push({ path: "id", message: "id must be a report id from an export (a UUID), or left empty." });
  const input = rowToInput(r);
  const check = reportInputSchema.safeParse(JSON.parse(JSON.stringify(input)));
  if (!check.success) issues.push(...zodIssues(check.error));
  if (input.speciesId && !known.species.has(input.speciesId))
    issues.push({ path: "species_id", message: `No species "${input.speciesId}" in the catalogue.` });
  if (input.conditionSlug && !known.conditions.has(input.conditionSlug))
    issues.push({ path: "condition_slug", message: `No condition "${input.conditionSlug}".` });
  if (input.treatment.agentSlug && !known.agents.has(input.treatment.agentSlug))
    issues.push({ path: "agent_slug", message: `No agent "${input.treatment.agentSlug}".` });
  const status = str(r.status) ?? "awaiting_review";
  if (!(importStatuses as readonly string[]).includes(status))
    issues.push({
      path: "status",
      message: "status must be accepted, awaiting_review, returned, declined or retracted (or empty).",
    });
  const times: Record<string, Date | null> = {};
  for (const column of ["submitted_at", "decided_at"] as const) {
    const v = str(r[column]);
    times[column] = null;
    if (v === undefined) continue;
    if (isoTime.safeParse(v).success) times[column] = new Date(v);
    else
      issues.push({
        path: column,
        message: `${column} must be a date and time (ISO 8601, for example 2026-05-01T12:00:00Z), or empty.`,
      });
  }
  let events: ExchangedEvent[] = [];
  const eventsCell = str(r.review_events);
  if (eventsCell !== undefined) {
    let json: unknown;
    try {
      json = JSON.parse(eventsCell);
    } catch {
      issues.push({
        path: "review_events",
        message:
          "review_events must be a JSON array of { at, actor, action, from, to, note }, as the export writes it.",
      });
    }
    if (json !== undefined) {
      const ev = eventsSchema.safeParse(json);
      if (!ev.success)
        issues.push(
          ...ev.error.issues.map((i) => ({
            path: ["review_events", ...i.path.map(String)].join("."),
            message: i.message,
          })),
        );
      else {
        const bad = ev.data.flatMap((e, k) =>
          [e.actor, e.note].flatMap((s) => (s && controlCharacterIn(s) ? [k] : [])),
        );
        if (bad.length)
          issues.push({ path: `review_events.${bad[0]}`, message: "Contains a control character; remove it." });
        else events = ev.data;
      }
    }
  }
  if (issues.length || !check.success) return { issues };

  const columns = toColumns(check.data);
  let derived: Awaited<ReturnType<typeof derive>>;
  try {
    derived = await deriveCached(db, cache, columns);
  } catch (err) {
    if (err instanceof AppError && err.issues) return { issues: err.issues };
    throw err;
  }
  const reporter = str(r.reporter) ?? null;
  const decided = status !== "awaiting_review";
  return {
    good: {
      row,
      id,
      status: status as GoodRow["status"],
      reporter,
      fingerprint: fingerprint(check.data, reporter),
      columns: { ...columns, ...derived },
      events,
      submittedAt: times.submitted_at ?? new Date(),
      decidedAt: times.decided_at ?? (decided ? new Date() : null),
    },
  };
}

/**
 * Imports prepared rows. Every row is checked first with the API's report schema (nothing is written while
 * checking): a row whose id, or without an id whose content fingerprint, is already here is skipped; bad rows are
 * listed with what to fix. A dry run stops there. Then good rows are written in transactions of IMPORT_BATCH rows,
 * each keeping its status and its review events, so other requests are served between batches.
 */
export async function runReportsImport(p: PreparedImport, opts: ImportOptions = {}): Promise<ImportResult> {
  const { actor, rows } = p;
  const db = await getDb();
  const known = {
    species: new Set((await db.select({ id: schema.species.id }).from(schema.species)).map((x) => x.id)),
    conditions: new Set((await db.select({ slug: schema.conditions.slug }).from(schema.conditions)).map((x) => x.slug)),
    agents: new Set((await db.select({ slug: schema.agents.slug }).from(schema.agents)).map((x) => x.slug)),
  };
  const result: ImportResult = { imported: 0, skipped: 0, rejected: [], touched: [], dryRun: Boolean(opts.dryRun) };
  const good: GoodRow[] = [];
  const seenIds = new Set<string>();
  const seenPrints = new Set<string>();
  const cache: DeriveCache = new Map();

  for (let start = 0; start < rows.length; start += CHECK_CHUNK) {
    const chunk = rows.slice(start, start + CHECK_CHUNK);
    const ids = chunk.map((r) => str(r.id)).filter((x): x is string => !!x && ID.test(x));
    const present = new Set(
      ids.length
        ? (await db.select({ id: reports.id }).from(reports).where(inArray(reports.id, ids))).map((x) => x.id)
        : [],
    );
    const checked: (Omit<GoodRow, "id" | "hadId"> & { id: string | undefined })[] = [];
    for (const [k, raw] of chunk.entries()) {
      const row = start + k + 2;
      const id = str(raw.id);
      if (id && (present.has(id) || seenIds.has(id))) {
        result.skipped += 1; // already here: changes nothing, whatever else the row says
        continue;
      }
      // Checking is JS work (schema, derived fields): hand the event loop back every few rows, not just per chunk.
      if (k % CHECK_YIELD_EVERY === CHECK_YIELD_EVERY - 1) await breathe();
      const c = await checkRow(db, raw, row, known, p.ragged.get(row), cache);
      if ("issues" in c) result.rejected.push({ row, issues: c.issues });
      else {
        if (c.good.id) seenIds.add(c.good.id);
        checked.push(c.good);
      }
    }
    const prints = checked.filter((g) => !g.id).map((g) => g.fingerprint);
    const printed = new Set(
      prints.length
        ? (await db.select({ f: reports.fingerprint }).from(reports).where(inArray(reports.fingerprint, prints))).map(
            (x) => x.f,
          )
        : [],
    );
    for (const g of checked) {
      if (!g.id && (printed.has(g.fingerprint) || seenPrints.has(g.fingerprint))) {
        result.skipped += 1;
        continue;
      }
      seenPrints.add(g.fingerprint);
      good.push({ ...g, hadId: !!g.id, id: g.id ?? crypto.randomUUID() });
    }
    opts.onProgress?.({ phase: "checking", done: Math.min(start + CHECK_CHUNK, rows.length), total: rows.length });
    await breathe();
  }

  if (opts.dryRun) {
    result.imported = good.length;
    result.touched = pairsOf(good.filter((g) => g.status === "accepted"));
    return result;
  }
  if (result.rejected.length && !opts.partial) throw new ImportRefused(result);

  for (let start = 0; start < good.length; start += IMPORT_BATCH) {
    const batch = good.slice(start, start + IMPORT_BATCH);
    let written: GoodRow[];
    try {
      written = await db.transaction((tx) => writeBatch(tx, actor, batch));
    } catch (err) {
      // Earlier batches are committed: say so, rather than the generic "the change was not made".
      console.error("Import batch failed:", err);
      throw new AppError(
        "internal",
        `${result.imported} reports were imported before an error on our side at file rows ${batch[0]!.row}–${batch.at(-1)!.row}; nothing after that was written. Import the file again later: reports already here are skipped.`,
        undefined,
        { cause: err },
      );
    }
    result.imported += written.length;
    result.skipped += batch.length - written.length;
    const pairs = pairsOf(written.filter((g) => g.status === "accepted"));
    result.touched.push(...pairs);
    await evidenceTouched(pairs);
    opts.onProgress?.({ phase: "writing", done: Math.min(start + IMPORT_BATCH, good.length), total: good.length });
    await breathe();
  }
  result.touched = pairsOf(result.touched.map((t) => ({ columns: t, status: "accepted" })));
  if (result.imported) {
    await refreshPlannerStatistics(); // the table grew in bulk
    await checkpointAfterBulkWrite();
  }
  // The worker drains each batch's pairs as they commit; the answer waits for the last, so the figures an admin
  // looks at next already count the file.
  if (result.touched.length) await drainEvidenceOutbox();
  return result;
}

/** The embedded database has no checkpointer of its own: write the import's WAL out now, so it can be recycled. */
async function checkpointAfterBulkWrite(): Promise<void> {
  try {
    await checkpointEmbedded();
  } catch (err) {
    console.warn("Could not checkpoint after the import:", err instanceof Error ? err.message : err);
  }
}

/** After a batch commits: its pairs are already in the evidence outbox; wake the worker to drain them. */
async function evidenceTouched(pairs: Pair[]): Promise<void> {
  if (pairs.length) wakeEvidenceWorker();
}

function pairsOf(rows: { columns: { groupSlug?: string | null; agentSlug?: string | null } }[]): Pair[] {
  const seen = new Map<string, Pair>();
  for (const { columns: c } of rows) {
    if (!c.groupSlug || !c.agentSlug) continue;
    seen.set(`${c.groupSlug}\u0000${c.agentSlug}`, { groupSlug: c.groupSlug, agentSlug: c.agentSlug });
  }
  return [...seen.values()];
}

/** Writes one batch; returns the rows it wrote (a row another import wrote meanwhile is left alone). */
async function writeBatch(tx: Tx, actor: Actor, batch: GoodRow[]): Promise<GoodRow[]> {
  // One import batch at a time across processes: the re-check below then sees every committed batch, so two
  // imports of the same file at once cannot both write a row (fingerprints are not unique in the table).
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext('tanklore.reports-import'))`);
  const ids = batch.filter((g) => g.hadId).map((g) => g.id);
  const prints = batch.filter((g) => !g.hadId).map((g) => g.fingerprint);
  const taken = new Set(
    ids.length
      ? (await tx.select({ id: reports.id }).from(reports).where(inArray(reports.id, ids))).map((x) => x.id)
      : [],
  );
  const printed = new Set(
    prints.length
      ? (await tx.select({ f: reports.fingerprint }).from(reports).where(inArray(reports.fingerprint, prints))).map(
          (x) => x.f,
        )
      : [],
  );
  const fresh = batch.filter((g) => (g.hadId ? !taken.has(g.id) : !printed.has(g.fingerprint)));
  if (!fresh.length) return [];
  // Statements of INSERT_ROWS rows with a turn of the event loop between them: building one statement's SQL and
  // parameters is JS work that grows with its rows (a 250-row statement held the server ~0.1 s).
  const inserted: { id: string }[] = [];
  for (let k = 0; k < fresh.length; k += INSERT_ROWS) {
    if (k) await breathe();
    inserted.push(
      ...(await tx
        .insert(reports)
        .values(
          fresh.slice(k, k + INSERT_ROWS).map((g) => ({
            ...g.columns,
            id: g.id,
            authorId: actor.id,
            status: g.status,
            source: "import",
            externalReporter: g.reporter,
            fingerprint: g.fingerprint,
            showName: false,
            submittedAt: g.submittedAt,
            decidedAt: g.decidedAt,
          })),
        )
        .onConflictDoNothing({ target: reports.id })
        .returning({ id: reports.id })),
    );
  }
  const done = new Set(inserted.map((x) => x.id));
  const written = fresh.filter((g) => done.has(g.id));
  const now = new Date();
  const events = written.flatMap((g) => [
    ...g.events.map((e) => ({
      reportId: g.id,
      actorId: null,
      actorName: e.actor,
      action: e.action,
      fromStatus: e.from,
      toStatus: e.to,
      note: e.note,
      at: new Date(e.at),
    })),
    {
      reportId: g.id,
      actorId: actor.id,
      actorName: null,
      action: "imported",
      fromStatus: null,
      toStatus: g.status,
      note: `CSV row ${g.row}`,
      at: now,
    },
  ]);
  // Bounded statements (PostgreSQL takes at most 65,535 parameters in one), the event loop handed back between.
  for (let k = 0; k < events.length; k += INSERT_ROWS * 5) {
    await breathe();
    await tx.insert(reportEvents).values(events.slice(k, k + INSERT_ROWS * 5));
  }
  // The accepted pairs this batch moved are queued for recompute in the batch's own transaction.
  await enqueueEvidenceRecompute(tx, pairsOf(written.filter((g) => g.status === "accepted")));
  return written;
}

/** Checks and imports a reports CSV in one call (the API's synchronous answer). */
export async function importReportsCsv(
  actor: Actor | null,
  text: string,
  opts: ImportOptions = {},
): Promise<ImportResult> {
  return runReportsImport(await prepareReportsImport(actor, text), opts);
}
