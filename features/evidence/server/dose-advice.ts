import { getCatalogue, getClubSettings, planDoseFromQuery } from "@/features/catalogue/server";
import { courseSchedule, type DoseQuery, type Plan, type PlanIcsQuery } from "@/features/dosing";
import { planCalendar } from "@/features/dosing/server";
import { cautionPoints } from "@/features/shared/components/cautions";
import { AppError } from "@/features/shared/errors";
import { isFitted, riskAt } from "../dose-response";
import { getSummaries } from "./queries";

/** A group's stored Summary for an agent (zero counts where the group has no reports), or null. The course log's guard rails read it too. */
export async function groupSummary(groupSlug: string, agentSlug: string) {
  const { groups } = await getSummaries(agentSlug);
  return groups.find((g) => g.group.slug === groupSlug) ?? null;
}

/**
 * GET /api/dose with the named group's evidence: the plan, its warnings, the evidence, a cautious first dose and,
 * where the group has a fitted dose–response, the fitted chance that the planned concentration goes badly with its
 * pointwise interval at the club's level (`extrapolated` when the dose lies outside the reported doses).
 */
export async function planDoseWithEvidence(
  q: DoseQuery,
  scheduled?: (plan: Plan) => { label: string; concentration: number }[],
) {
  const answer = await planDoseFromQuery(q, { loadEvidence: groupSummary, scheduled });
  if (!("evidence" in answer)) return answer;
  const fit = answer.evidence?.doseResponse;
  if (!isFitted(fit) || !(answer.concentration > 0)) return { ...answer, risk: null };
  const { confidenceLevel } = await getClubSettings();
  const at = riskAt(fit, answer.concentration, confidenceLevel);
  const extrapolated =
    fit.curve.length > 0 &&
    (answer.concentration < fit.curve[0]!.dose || answer.concentration > fit.curve.at(-1)!.dose);
  return { ...answer, risk: { ...at, level: confidenceLevel, extrapolated } };
}

/** GET /api/dose/plan.ics: the planned course from `start`, a dose every interval, then the checks, as iCalendar. */
export async function planCalendarFromQuery(q: PlanIcsQuery) {
  const { start, doses, intervalHours, ...doseQuery } = q;
  const agent = (await getCatalogue()).agents.find((a) => a.slug === doseQuery.agent);
  const interval = intervalHours ?? agent?.redoseHours ?? null;
  // Later doses are checked too, so a warning names "dose 2 and dose 3" and not only the target.
  const later = (plan: Plan) =>
    Array.from({ length: doses - 1 }, (_, i) => ({ label: `dose ${i + 2}`, concentration: plan.concentration }));
  const answer = await planDoseWithEvidence(doseQuery, later);
  if (!agent)
    throw new AppError("invalid", "Some query parameters need fixing; see issues.", [
      { path: "agent", message: `No agent "${doseQuery.agent}" in the catalogue.` },
    ]);
  if (doses > 1 && interval == null) {
    throw new AppError("invalid", "Some query parameters need fixing; see issues.", [
      {
        path: "intervalHours",
        message: `${agent.name} has no usual redosing interval: give intervalHours for ${doses} doses, or ask for 1 dose.`,
      },
    ]);
  }
  const items = courseSchedule(answer, new Date(start), doses, interval, agent.watchDays);
  return planCalendar({
    agentName: agent.name,
    unit: answer.unit,
    items,
    warnings: answer.warnings,
    cautions: cautionPoints,
    uidPrefix: `${agent.slug}-${new Date(start).getTime()}`,
  });
}
