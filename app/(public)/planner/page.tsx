import { Suspense } from "react";
import { getCatalogue, getClubSettings } from "@/features/catalogue/server";
import { Planner } from "@/features/dosing/components/planner";
import { Cautions } from "@/features/shared/components/cautions";
import { PageTitle } from "@/features/shared/components/ui";

export const metadata = { title: "Dose planner" };

export default async function PlannerPage() {
  const [{ agents, species, speciesGroups }, settings] = await Promise.all([getCatalogue(), getClubSettings()]);
  return (
    <div className="grid gap-6">
      <PageTitle lead="Say which fish you are treating to see what club members reported for them, then turn a target concentration and your tank's volume into millilitres of your stock bottle — or check what the millilitres you added made. Start with a reduced dose.">
        Dose planner
      </PageTitle>
      <Cautions compact />
      <Suspense>
        <Planner
          agents={agents}
          firstDoseFraction={settings.firstDoseFraction}
          fish={{ species, groups: speciesGroups.map((g) => ({ slug: g.slug, name: g.name })) }}
        />
      </Suspense>
    </div>
  );
}
