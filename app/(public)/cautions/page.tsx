import { Cautions } from "@/features/shared/components/cautions";
import { PageTitle } from "@/features/shared/components/ui";

export const metadata = { title: "Cautions" };

export default function CautionsPage() {
  return (
    <div className="grid max-w-3xl gap-6">
      <PageTitle lead="Read these before any treatment. They apply whatever a summary or the planner says.">
        Cautions
      </PageTitle>
      <Cautions />
      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">Why the figures are anecdotal</h2>
        <p>
          A report tells us what one keeper saw in one tank. Water chemistry, temperature, the fish&apos;s condition and
          how carefully the dose was measured all differ from tank to tank. Moderators check that reports are plausible,
          not that they are right. A summary built from many such reports is a starting point for a cautious first dose
          — never a guarantee that a dose is safe.
        </p>
      </section>
    </div>
  );
}
