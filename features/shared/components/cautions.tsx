import { Notice } from "./ui";

/** The cautions shown on the planner, the evidence pages and the report form. Our own wording. */
export const cautionPoints = [
  "Oxidisers and fish medicines harm people as well as fish: wear gloves and eye protection, and rinse any splash off at once with plenty of water.",
  "Use a product whose only ingredients are the active chemical and water — no added stabilisers, perfumes or colours.",
  "Never mix treatments, and never add one on top of another: many combinations are more toxic than either alone.",
  "Keep bottles and treated water away from children and pets.",
  "An overdose can kill fish within hours. Stay with the tank after dosing: gasping at the surface, darting, loss of colour or lying on the bottom mean act now — change a large share of the water with temperature-matched, dechlorinated water.",
  "Try a reduced dose on a few fish first, especially with small, scaleless or soft-water species.",
  "The figures here are members' anecdotal reports, not veterinary advice: an aquatic veterinarian knows your case, and local rules on animal medicines and on disposing of treated water apply.",
];

/** The last point without its "anecdotal" half, for pages that already carry the anecdotal notice once. */
const vetPoint =
  "An aquatic veterinarian knows your case, and local rules on animal medicines and on disposing of treated water apply.";

/** `anecdotal={false}` on pages that show the anecdotal notice elsewhere, so it is read once, not skimmed past. */
export function Cautions({ compact = false, anecdotal = true }: { compact?: boolean; anecdotal?: boolean }) {
  const points = anecdotal ? cautionPoints : [...cautionPoints.slice(0, -1), vetPoint];
  return (
    <Notice tone="caution" title="Before you treat">
      <ul className={compact ? "list-disc space-y-1 pl-5" : "list-disc space-y-2 pl-5"}>
        {points.map((p) => (
          <li key={p}>{p}</li>
        ))}
      </ul>
    </Notice>
  );
}
