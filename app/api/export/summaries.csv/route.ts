import Papa from "papaparse";
import { summaryQuerySchema } from "@/features/evidence";
import { getSummaries } from "@/features/evidence/server";
import { csvWriteOptions } from "@/features/exchange/server";
import { parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  const q = parseQuery(req, summaryQuerySchema);
  const s = await getSummaries(q.agent, q.condition);
  const rows = s.groups.map((g) => ({
    group: g.group.slug,
    group_name: g.group.name,
    agent: s.agent,
    unit: s.unit,
    condition: s.condition ?? "all",
    reports: g.reports,
    members: g.members,
    fish: g.fish,
    tolerated: g.tolerated,
    tolerated_share: g.toleratedShare.value ?? "",
    tolerated_share_low: g.toleratedShare.low ?? "",
    tolerated_share_high: g.toleratedShare.high ?? "",
    dose_min: g.toleratedDose.min ?? "",
    dose_p10: g.toleratedDose.p10 ?? "",
    dose_p25: g.toleratedDose.p25 ?? "",
    dose_median: g.toleratedDose.median ?? "",
    dose_p75: g.toleratedDose.p75 ?? "",
    dose_p90: g.toleratedDose.p90 ?? "",
    dose_max: g.toleratedDose.max ?? "",
    median_interval_low: g.toleratedDose.medianInterval?.low ?? "",
    median_interval_high: g.toleratedDose.medianInterval?.high ?? "",
    median_interval_coverage: g.toleratedDose.medianInterval?.coverage ?? "",
    lowest_adverse_dose: g.lowestAdverseDose ?? "",
    bmd10: g.doseResponse?.bmd ?? "",
    bmdl10: g.doseResponse?.bmdl ?? "",
    sparse: g.sparse,
    confidence_level: s.confidenceLevel,
    method_version: s.methodVersion,
  }));
  // The notice travels inside the file, as comment lines that spreadsheet users see first.
  const csv = `# ${s.notice}\n# Tanklore summaries for ${s.agentName} (${s.unit}); confidence level ${s.confidenceLevel} %; method ${s.methodVersion}; exported ${new Date().toISOString()}\n${Papa.unparse(rows, csvWriteOptions)}\n`;
  return new Response(csv, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="tanklore-summaries-${s.agent}.csv"`,
    },
  });
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
