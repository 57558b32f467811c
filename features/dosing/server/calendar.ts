import { createEvents, type EventAttributes } from "ics";
import type { DoseWarning } from "../guard-rails";
import type { CourseItem } from "../plan";

export interface CalendarInput {
  agentName: string;
  unit: string;
  items: CourseItem[];
  warnings: DoseWarning[];
  cautions: string[];
  /** Stable per plan, so re-importing the file updates the events instead of doubling them. */
  uidPrefix: string;
}

const fmt = (n: number) => Number(n.toPrecision(3)).toString();

/** The dosing and watching plan as iCalendar: one event per dose and per check, the cautions in every description. */
export function planCalendar(input: CalendarInput): string {
  const caution = [
    ...(input.warnings.length ? ["WARNINGS:", ...input.warnings.map((w) => `- ${w.message}`), ""] : []),
    "Before you treat:",
    ...input.cautions.map((c) => `- ${c}`),
  ].join("\n");
  const events: EventAttributes[] = input.items.map((item, i) => {
    const what =
      item.kind === "dose"
        ? `${input.agentName}: ${item.label} — ${item.doseGrams !== undefined ? `dissolve ${fmt(item.doseGrams)} g of dry salt in tank water and add it` : `add ${fmt(item.doseMl!)} mL`} (${fmt(item.concentration!)} ${input.unit}${item.reduced ? ", reduced first dose" : ""})`
        : `${input.agentName}: ${item.label}`;
    return {
      uid: `${input.uidPrefix}-${i + 1}@tanklore`,
      start: item.at.getTime(),
      startInputType: "utc",
      startOutputType: "utc",
      duration: { minutes: item.kind === "dose" ? 15 : 30 },
      title: what,
      description: `${what}\n\n${caution}`,
      categories: [item.kind === "dose" ? "dose" : "check"],
      productId: "tanklore/dose-plan",
    };
  });
  const { error, value } = createEvents(events, {
    productId: "tanklore/dose-plan",
    calName: `${input.agentName} course`,
  });
  if (error || value == null) throw error ?? new Error("The calendar could not be written.");
  return foldOctets(value);
}

/**
 * Folds content lines at 75 octets, as RFC 5545 §3.1 asks (the writer counts characters, so a line with an en
 * dash or a µ ran to 80 octets and more, which strict calendar apps refuse). Continuation lines begin with a
 * space; a multi-byte character is never split.
 */
export function foldOctets(ics: string): string {
  const unfolded = ics.replace(/\r\n[ \t]/g, "").split("\r\n");
  const out: string[] = [];
  for (const line of unfolded) {
    let current = "";
    let octets = 0;
    let limit = 75;
    for (const ch of line) {
      const size = Buffer.byteLength(ch, "utf8");
      if (octets + size > limit) {
        out.push(current);
        current = " ";
        octets = 1;
        limit = 75;
      }
      current += ch;
      octets += size;
    }
    out.push(current);
  }
  return out.join("\r\n");
}
