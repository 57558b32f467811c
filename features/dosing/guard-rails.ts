// Guard rails shared by the API, the planner page, the report form and the course log: each compares a dose
// with what the catalogue and the club's evidence know, and says in plain words why the keeper should stop and think.

export const doseWarningCodes = [
  "above_ceiling",
  "at_or_above_lowest_adverse",
  "above_highest_tolerated",
  "above_bmdl",
  "lowest_adverse_at_or_below_median",
  "sparse_evidence",
  "no_evidence",
] as const;
export type DoseWarningCode = (typeof doseWarningCodes)[number];

export interface DoseWarning {
  code: DoseWarningCode;
  message: string;
}

/** The parts of a group's evidence Summary the guard rails read (the Summary type satisfies it). */
export interface GuardEvidence {
  group: { slug: string; name: string };
  reports: number;
  sparse: boolean;
  toleratedDose: { median: number | null; max: number | null };
  lowestAdverseDose: number | null;
  /** Present once summaries carry a dose–response fit; only a fitted model has a bmdl. */
  doseResponse?: { bmdl?: number | null } | null;
}

export interface GuardInput {
  /** The agent's unit, for the messages. */
  unit: string;
  /** The catalogue's plausible ceiling for the agent (null: none known). */
  ceiling: number | null;
  /** Doses to check, each with the words that name it ("the target", "dose 2"). */
  doses: { label: string; concentration: number }[];
  /** undefined: no group was asked about (no evidence warnings); null: the group has no summary for the agent. */
  evidence?: GuardEvidence | null;
}

const fmt = (n: number) => Number(n.toPrecision(3)).toString();

/** The BMDL of a summary's dose–response fit, when there is one. */
export function bmdlOf(evidence: GuardEvidence | null | undefined): number | null {
  const b = evidence?.doseResponse?.bmdl;
  return typeof b === "number" && Number.isFinite(b) && b > 0 ? b : null;
}

/** Every warning that applies; the highest dose checked decides, and each code appears at most once. */
export function doseWarnings(input: GuardInput): DoseWarning[] {
  const warnings: DoseWarning[] = [];
  const { unit, ceiling, evidence } = input;
  const doses = input.doses.filter((d) => Number.isFinite(d.concentration));
  const highest = doses.reduce<{ label: string; concentration: number } | null>(
    (m, d) => (m === null || d.concentration > m.concentration ? d : m),
    null,
  );
  const over = (limit: number, inclusive: boolean) =>
    doses.filter((d) => (inclusive ? d.concentration >= limit : d.concentration > limit));
  // "The target (25 mg/L) is" / "Dose 2 and dose 3 (25.1 mg/L) are": names the offending doses in words.
  const name = (list: { label: string; concentration: number }[]) => {
    const top = list.reduce((m, d) => (d.concentration > m.concentration ? d : m));
    const same = list.every((d) => d.concentration === top.concentration);
    const labels =
      list.length === 1
        ? list[0]!.label
        : `${list
            .slice(0, -1)
            .map((d) => d.label)
            .join(", ")} and ${list.at(-1)!.label}`;
    return `${capital(labels)} (${same ? "" : "up to "}${fmt(top.concentration)} ${unit}) ${list.length === 1 ? "is" : "are"}`;
  };

  if (ceiling != null && highest) {
    const hit = over(ceiling, false);
    if (hit.length) {
      warnings.push({
        code: "above_ceiling",
        message: `${name(hit)} above ${fmt(ceiling)} ${unit}, the highest dose the club's catalogue thinks plausible for this treatment. Check for a typing slip or a decimal point in the wrong place before you add anything.`,
      });
    }
  }

  if (evidence === undefined) return warnings;
  if (evidence === null || evidence.reports === 0) {
    warnings.push({
      code: "no_evidence",
      message: `The club has no accepted reports of this treatment${evidence ? ` for ${evidence.group.name}` : " for this group"}. Nobody here knows how these fish take it: start well below the usual dose, try a few fish first, and ask an aquatic vet.`,
    });
    return warnings;
  }
  const group = evidence.group.name;
  const adverse = evidence.lowestAdverseDose;
  const median = evidence.toleratedDose.median;
  if (adverse != null && median != null && adverse <= median) {
    warnings.push({
      code: "lowest_adverse_at_or_below_median",
      message: `Careful: for ${group}, a dose of ${fmt(adverse)} ${unit} has already gone badly (fish lost or severely distressed), at or below the usual tolerated dose of ${fmt(median)} ${unit}. The usual dose is not a safe dose for these fish.`,
    });
  }
  if (adverse != null) {
    const hit = over(adverse, true);
    if (hit.length) {
      warnings.push({
        code: "at_or_above_lowest_adverse",
        message: `${name(hit)} at or above ${fmt(adverse)} ${unit}, a dose at which ${group} have already been lost or severely distressed in a member's report. Use a lower dose.`,
      });
    }
  }
  const max = evidence.toleratedDose.max;
  if (max != null) {
    const hit = over(max, false);
    if (hit.length) {
      warnings.push({
        code: "above_highest_tolerated",
        message: `${name(hit)} above ${fmt(max)} ${unit}, the highest dose the club has seen ${group} tolerate. Nobody here has reported how they take more.`,
      });
    }
  }
  const bmdl = bmdlOf(evidence);
  if (bmdl != null) {
    const hit = over(bmdl, false);
    if (hit.length) {
      warnings.push({
        code: "above_bmdl",
        message: `${name(hit)} above ${fmt(bmdl)} ${unit}, the dose below which the club's fitted curve says one in ten courses going badly cannot be ruled out for ${group}.`,
      });
    }
  }
  if (evidence.sparse) {
    warnings.push({
      code: "sparse_evidence",
      message: `Only ${evidence.reports} accepted report${evidence.reports === 1 ? "" : "s"} for ${group}: too few to lean on. Treat the figures as a hint, start low and watch closely.`,
    });
  }
  return warnings;
}

const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** Half of the usual dose, unless the club sets another default (common practice, no published source). */
export const DEFAULT_FIRST_DOSE_FRACTION = 0.5;

export interface SuggestedFirstDose {
  /** The share of the group's tolerated median that the suggestion is. */
  fraction: number;
  concentration: number;
  /** What held the dose down: the chosen fraction of the median, the lowest adverse dose, or the BMDL. */
  limitedBy: "median" | "lowest_adverse" | "bmdl";
}

/**
 * A cautious first dose from a group's evidence: `fraction` of the tolerated median, never at or above the lowest
 * adverse dose (then the same fraction of that dose) nor above the BMDL where a fit has one. Null without a median.
 */
export function suggestFirstDose(
  evidence: GuardEvidence | null | undefined,
  fraction = DEFAULT_FIRST_DOSE_FRACTION,
): SuggestedFirstDose | null {
  const median = evidence?.toleratedDose.median;
  if (!evidence || median == null || !(median > 0)) return null;
  let concentration = median * fraction;
  let limitedBy: SuggestedFirstDose["limitedBy"] = "median";
  const adverse = evidence.lowestAdverseDose;
  if (adverse != null && concentration >= adverse) {
    concentration = adverse * fraction;
    limitedBy = "lowest_adverse";
  }
  const bmdl = bmdlOf(evidence);
  if (bmdl != null && concentration > bmdl) {
    concentration = bmdl;
    limitedBy = "bmdl";
  }
  return { fraction: concentration / median, concentration, limitedBy };
}

/** Rounds down to three significant figures, so a rounded dose never lands above the limit it was held to. */
export function floorSig3(x: number): number {
  if (!(x > 0)) return x;
  const step = 10 ** (Math.floor(Math.log10(x)) - 2);
  return Number((Math.floor(x / step + 1e-9) * step).toPrecision(3));
}

export interface CautiousPlan {
  /** The full dose the later doses go to (the agent's unit). */
  target: number;
  /** The first dose's share of it (1: every dose at the held dose). */
  fraction: number;
  first: SuggestedFirstDose;
}

/**
 * The plan the evidence offers a newcomer: a first dose (suggestFirstDose) and the full dose after it. The full
 * dose is the tolerated median only where the median is below the group's lowest adverse dose and not above the
 * BMDL; otherwise every dose stays at the held first dose, so no later dose is planned where fish have already
 * fared badly. Both figures are rounded down to three significant figures.
 */
export function cautiousPlan(
  evidence: GuardEvidence | null | undefined,
  fraction = DEFAULT_FIRST_DOSE_FRACTION,
): CautiousPlan | null {
  const first = suggestFirstDose(evidence, fraction);
  const median = evidence?.toleratedDose.median;
  if (!first || median == null) return null;
  const adverse = evidence!.lowestAdverseDose;
  const bmdl = bmdlOf(evidence);
  const medianSafe = (adverse == null || median < adverse) && (bmdl == null || median <= bmdl);
  if (!medianSafe) return { target: floorSig3(first.concentration), fraction: 1, first };
  // Below the lowest adverse dose and the BMDL, the first dose is the chosen share of the median itself.
  return { target: floorSig3(median), fraction, first };
}
