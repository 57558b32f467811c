// The plan a course was started with, as the planner worked it out: the fish, the target, the first dose and the
// warnings the keeper acknowledged there (worked out again on the server from the plan, never taken from the address).

export interface CoursePlanView {
  fish: string | null;
  agentName: string;
  unit: string;
  target: number;
  firstDose: { fraction: number; concentration: number; amount: string } | null;
  fullAmount: string;
  volumeL: number;
  warnings: { code: string; message: string }[];
  /** The warning codes ticked as read in the planner. */
  acknowledged: string[];
}

const sig = (n: number) => Number(n.toPrecision(3)).toLocaleString("en-GB");

export function CoursePlanNote({ plan }: { plan: CoursePlanView }) {
  const allRead = plan.warnings.every((w) => plan.acknowledged.includes(w.code));
  return (
    <section
      className="grid min-w-0 gap-2 rounded-lg border-2 border-peat-500 bg-white p-4"
      aria-label="Your plan from the dose planner"
      data-testid="course-plan"
    >
      <h2 className="text-lg font-bold text-peat-900">Your plan from the dose planner</h2>
      <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
        {plan.fish ? (
          <>
            <dt className="font-bold">Fish</dt>
            <dd data-testid="course-plan-fish">{plan.fish}</dd>
          </>
        ) : null}
        <dt className="font-bold">Treatment</dt>
        <dd>{plan.agentName}</dd>
        <dt className="font-bold">Water</dt>
        <dd>{sig(plan.volumeL)} L</dd>
        <dt className="font-bold">Target</dt>
        <dd data-testid="course-plan-target">
          {sig(plan.target)} {plan.unit} ({plan.fullAmount})
        </dd>
        {plan.firstDose ? (
          <>
            <dt className="font-bold">First dose</dt>
            <dd data-testid="course-plan-first">
              {plan.firstDose.amount}, {sig(plan.firstDose.concentration)} {plan.unit} (
              {Math.round(plan.firstDose.fraction * 100)} % of the target)
            </dd>
          </>
        ) : null}
      </dl>
      {plan.warnings.length ? (
        <div className="grid gap-1 rounded-md bg-alarm-100 p-3 text-alarm-700" data-testid="course-plan-warnings">
          <p className="font-bold">
            {allRead ? "Warnings you acknowledged in the planner" : "Warnings on this plan: read them before you dose"}
          </p>
          <ul className="list-disc space-y-1 pl-5 text-sm">
            {plan.warnings.map((w) => (
              <li key={w.code} data-code={w.code}>
                {w.message}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      <p className="text-sm text-peat-700">
        The form below is filled in from this plan; check every figure against your own tank. Each dose you log is
        checked against the same warnings.
      </p>
    </section>
  );
}
