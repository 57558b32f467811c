import Link from "next/link";
import { getCatalogue, getCatalogueChanges } from "@/features/catalogue/server";
import { CatalogueEditor, type FieldDef } from "@/features/catalogue/components/catalogue-editor";
import { catalogueKinds, type CatalogueKind } from "@/features/catalogue";
import { PageTitle } from "@/features/shared/components/ui";
import { History } from "lucide-react";
import { EmptyState } from "@/features/shared/components/empty-state";
import { getPageActor } from "@/features/members/server";
import { pageData } from "@/features/shared/server/page";
import { When } from "@/features/shared/components/when";

export const metadata = { title: "Catalogue" };

/** The change log in words: "Orla changed the species “betta-splendens”". */
const changeWords: Record<string, string> = {
  create: "added",
  update: "changed",
  delete: "deleted",
  merge: "merged away",
};
const entityWords: Record<string, string> = {
  groups: "the species group",
  species: "the species",
  agents: "the treatment",
  conditions: "the condition",
  "stock-forms": "the stock preset",
};
const labels: Record<CatalogueKind, string> = {
  groups: "Species groups",
  species: "Species",
  agents: "Treatments (agents)",
  conditions: "Conditions",
  "stock-forms": "Stock presets",
};

export default async function CataloguePage({ searchParams }: { searchParams: Promise<{ list?: string }> }) {
  const { list } = await searchParams;
  const kind = (catalogueKinds as readonly string[]).includes(list ?? "") ? (list as CatalogueKind) : "species";
  const actor = await getPageActor();
  const [catalogue, changes] = await Promise.all([getCatalogue(), pageData(getCatalogueChanges({ actor }, 15))]);
  const groupOptions = catalogue.speciesGroups.map((g) => ({ value: g.slug, label: g.name }));
  const agentOptions = catalogue.agents.map((a) => ({ value: a.slug, label: a.name }));
  const defs: Record<CatalogueKind, { fields: FieldDef[]; columns: string[] }> = {
    groups: {
      fields: [
        { name: "slug", label: "Slug", type: "text", key: true },
        { name: "name", label: "Name", type: "text" },
        { name: "description", label: "Description", type: "text" },
        { name: "sortOrder", label: "Order", type: "number" },
        { name: "hidden", label: "Hidden", type: "checkbox" },
      ],
      columns: ["slug", "name", "sortOrder"],
    },
    species: {
      fields: [
        { name: "scientificName", label: "Scientific name", type: "text", key: true },
        { name: "commonName", label: "Common name", type: "text" },
        { name: "groupSlug", label: "Group", type: "select", options: groupOptions },
        { name: "hidden", label: "Hidden", type: "checkbox" },
      ],
      columns: ["commonName", "scientificName", "groupSlug"],
    },
    agents: {
      fields: [
        { name: "slug", label: "Slug", type: "text", key: true },
        { name: "name", label: "Name", type: "text" },
        {
          name: "unit",
          label: "Unit",
          type: "select",
          options: [
            { value: "mg/L", label: "mg/L" },
            { value: "g/L", label: "g/L" },
          ],
        },
        {
          name: "bandEdges",
          label: "Dose band edges",
          type: "numbers",
          hint: "Rising numbers separated by commas, for example 0, 10, 20, 40.",
        },
        {
          name: "plausibleCeiling",
          label: "Plausible ceiling",
          type: "number",
          hint: "Doses above this are flagged for moderators.",
        },
        { name: "redoseHours", label: "Usual hours between doses (empty: given once)", type: "nullable-number" },
        { name: "watchDays", label: "Days of watching after the last dose", type: "number" },
        { name: "description", label: "Description", type: "text" },
        { name: "hidden", label: "Hidden", type: "checkbox" },
      ],
      columns: ["slug", "name", "unit", "bandEdges"],
    },
    conditions: {
      fields: [
        { name: "slug", label: "Slug", type: "text", key: true },
        { name: "name", label: "Name", type: "text" },
        { name: "description", label: "Description", type: "text" },
        { name: "hidden", label: "Hidden", type: "checkbox" },
      ],
      columns: ["slug", "name"],
    },
    "stock-forms": {
      fields: [
        { name: "id", label: "Id", type: "text", key: true },
        { name: "agentSlug", label: "Agent", type: "select", options: agentOptions },
        { name: "label", label: "Label", type: "text" },
        { name: "percent", label: "Strength (%)", type: "number" },
        {
          name: "basis",
          label: "Basis",
          type: "select",
          options: [
            { value: "w/v", label: "w/v" },
            { value: "w/w", label: "w/w" },
          ],
        },
        { name: "densityGPerMl", label: "Density, g/mL (needed for w/w)", type: "nullable-number" },
        { name: "activeFraction", label: "Active fraction (0–1)", type: "number" },
        {
          name: "compound",
          label: "Percentage is of this compound (blank: the agent's own measure)",
          type: "nullable-text",
        },
        { name: "hidden", label: "Hidden", type: "checkbox" },
      ],
      columns: ["id", "agentSlug", "label", "percent", "basis"],
    },
  };
  return (
    <div className="grid gap-6">
      <PageTitle lead="What members choose from when they report. Entries in use cannot be deleted: hide them, or merge a species into another. Every change is recorded.">
        Catalogue
      </PageTitle>
      <nav aria-label="Catalogue lists" className="flex flex-wrap gap-2">
        {catalogueKinds.map((k) => (
          <Link
            key={k}
            href={`/admin/catalogue?list=${k}`}
            aria-current={k === kind ? "page" : undefined}
            className={`rounded-full border px-3 py-1 no-underline ${k === kind ? "border-peat-700 bg-peat-700 text-white" : "border-peat-300 bg-white"}`}
          >
            {labels[k]}
          </Link>
        ))}
      </nav>
      <CatalogueEditor
        key={kind}
        kind={kind}
        title={labels[kind]}
        fields={defs[kind].fields}
        columns={defs[kind].columns}
        mergeTargets={
          kind === "species"
            ? catalogue.species.map((s) => ({ value: s.id, label: `${s.commonName} (${s.scientificName})` }))
            : undefined
        }
      />
      <section className="grid gap-1">
        <h2 className="text-xl font-bold text-peat-900">Recent changes</h2>
        {changes.length === 0 ? (
          <div className="rounded-lg border border-peat-100 bg-white">
            <EmptyState icon={<History />} title="No change yet.">
              Every addition, edit, hiding or merge in the lists above is recorded here, newest first.
            </EmptyState>
          </div>
        ) : (
          <ul>
            {changes.map((c) => (
              <li key={c.id}>
                <When at={c.at} />: {c.actorName ?? "someone"} {changeWords[c.action] ?? c.action}{" "}
                {c.entity === "club_settings" ? (
                  "the club settings"
                ) : (
                  <>
                    {entityWords[c.entity] ?? c.entity.replaceAll("_", " ")} “{c.entityKey}”
                  </>
                )}
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
