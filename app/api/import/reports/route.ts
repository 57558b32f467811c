import { importQuerySchema } from "@/features/exchange";
import { prepareReportsImport, runReportsImport, type ImportResult } from "@/features/exchange/server";
import { requireActor } from "@/features/members/server";
import { AppError } from "@/features/shared/errors";
import { errorResponse, json, parseQuery, readBody, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

const answer = ({ imported, skipped, rejected, touched, dryRun }: ImportResult) => ({
  imported,
  skipped,
  rejected,
  touched: touched.map((t) => ({ group: t.groupSlug, agent: t.agentSlug })),
  ...(dryRun ? { dryRun } : {}),
});

/**
 * With `Accept: application/x-ndjson` the answer streams one JSON line per progress step
 * ({ "progress": { phase, done, total } }), then { "result": … } or { "status", "error": … } last.
 */
export const POST = route(async (req) => {
  const actor = await requireActor(req.headers, ["admin"], "import reports");
  const opts = parseQuery(req, importQuerySchema);
  if (!(req.headers.get("content-type") ?? "").startsWith("text/csv")) {
    throw new AppError("unsupported_type", "Send the file as text/csv, with the columns of the reports export.");
  }
  const text = (await readBody(req, 20 * 1024 * 1024, "The file is larger than 20 MB; split it.")).toString("utf8");
  const prepared = await prepareReportsImport(actor, text);
  if (!(req.headers.get("accept") ?? "").includes("application/x-ndjson")) {
    return json(answer(await runReportsImport(prepared, opts)));
  }
  const encoder = new TextEncoder();
  let open = true;
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      const send = (line: unknown) => {
        if (!open) return; // the page went away: the import still finishes
        try {
          controller.enqueue(encoder.encode(`${JSON.stringify(line)}\n`));
        } catch {
          open = false;
        }
      };
      runReportsImport(prepared, { ...opts, onProgress: (progress) => send({ progress }) })
        .then((r) => send({ result: answer(r) }))
        .catch(async (err) => {
          const res = errorResponse(err);
          send({ status: res.status, ...(await res.json()) });
        })
        .finally(() => {
          if (open) controller.close();
          open = false;
        });
    },
    cancel() {
      open = false;
    },
  });
  return new Response(stream, {
    headers: { "content-type": "application/x-ndjson; charset=utf-8", "cache-control": "no-store" },
  });
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
