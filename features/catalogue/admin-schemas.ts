import { z } from "zod";
import { AppError } from "@/features/shared/errors";

const slug = z
  .string()
  .trim()
  .regex(/^[a-z0-9]+(-[a-z0-9]+)*$/, "Use lower-case letters, digits and single hyphens (for example dwarf-cichlids).")
  .max(60);
const name = (what: string) =>
  z.string().trim().min(2, `${what} needs at least 2 characters.`).max(120, `${what} is at most 120 characters.`);
const description = z.string().trim().max(500, "The description is at most 500 characters.");
const hidden = z.boolean({ error: "hidden must be true or false." });
const num = (what: string) =>
  z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be a number.`);

export const catalogueKinds = ["groups", "species", "agents", "conditions", "stock-forms"] as const;
export type CatalogueKind = (typeof catalogueKinds)[number];

export const groupInput = z
  .object({
    slug,
    name: name("The name"),
    description: description.default(""),
    sortOrder: z.number().int().default(0),
    hidden: hidden.default(false),
  })
  .strict();
export const speciesInput = z
  .object({
    scientificName: z
      .string()
      .trim()
      .regex(
        /^[A-Z][a-z]+( [a-z.'-]+){1,3}$/,
        "Give the scientific name as Genus species (for example Corydoras aeneus).",
      ),
    commonName: name("The common name"),
    groupSlug: slug,
    hidden: hidden.default(false),
  })
  .strict();
export const agentInput = z
  .object({
    slug,
    name: name("The name"),
    unit: z.enum(["mg/L", "g/L"], { error: "unit must be mg/L or g/L." }),
    bandEdges: z
      .array(num("A band edge"))
      .min(2, "Give at least two band edges.")
      .max(30, "At most 30 band edges.")
      .refine((xs) => xs.every((x, i) => i === 0 || x > xs[i - 1]!), "Band edges must rise from left to right."),
    plausibleCeiling: num("The plausible ceiling").refine((x) => x > 0, "The plausible ceiling must be above 0."),
    redoseHours: z
      .number()
      .int()
      .min(1)
      .max(24 * 60)
      .nullable()
      .default(null),
    watchDays: z.number().int().min(0).max(120).default(7),
    description: description.default(""),
    hidden: hidden.default(false),
  })
  .strict();
export const conditionInput = z
  .object({ slug, name: name("The name"), description: description.default(""), hidden: hidden.default(false) })
  .strict();
const stockFormFields = z
  .object({
    id: slug,
    agentSlug: slug,
    label: name("The label"),
    percent: num("The strength").refine((x) => x > 0 && x <= 100, "The strength is above 0 and at most 100 %."),
    basis: z.enum(["w/v", "w/w"], { error: "basis must be w/v or w/w." }),
    densityGPerMl: z.number().min(0.5).max(3).nullable().default(null),
    activeFraction: z.number().gt(0).max(1).default(1),
    compound: z.string().trim().min(2, "Name the compound in at least 2 characters.").max(120).nullable().default(null),
    hidden: hidden.default(false),
  })
  .strict();
export const stockFormInput = stockFormFields
  .refine((s) => s.basis === "w/v" || s.densityGPerMl !== null, {
    path: ["densityGPerMl"],
    message: "A % w/w preset needs the solution's density in g/mL.",
  })
  .refine((s) => s.activeFraction === 1 || s.compound !== null, {
    path: ["compound"],
    message: "An active fraction below 1 means the percentage is of a compound: name the compound.",
  });

export const catalogueInputs = {
  groups: groupInput,
  species: speciesInput,
  agents: agentInput,
  conditions: conditionInput,
  "stock-forms": stockFormInput,
} as const;
/** PATCH bodies: any subset of the fields (defaults dropped, so an absent field stays as it is). */
const partialOf = <T extends z.ZodObject>(o: T) =>
  z
    .object(
      Object.fromEntries(
        Object.entries(o.shape).map(([k, v]) => [
          k,
          (v instanceof z.ZodDefault ? (v.unwrap() as z.ZodType) : (v as z.ZodType)).optional(),
        ]),
      ),
    )
    .strict();
export const cataloguePatchInputs = {
  groups: partialOf(groupInput),
  species: partialOf(speciesInput),
  agents: partialOf(agentInput),
  conditions: partialOf(conditionInput),
  "stock-forms": partialOf(stockFormFields),
} as const;

export const mergeSpeciesInput = z
  .object({
    into: z.string().min(1, "Choose the species to merge into."),
    note: z.string().trim().min(3, "Say why, in a short note."),
  })
  .strict();

/** The catalogue list named in a URL, or a typed 404. */
export function parseCatalogueKind(kind: string): CatalogueKind {
  if (!(catalogueKinds as readonly string[]).includes(kind))
    throw new AppError("not_found", `There is no catalogue list "${kind}"; use one of ${catalogueKinds.join(", ")}.`);
  return kind as CatalogueKind;
}
