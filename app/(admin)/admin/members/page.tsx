import { PageTitle } from "@/features/shared/components/ui";
import { MembersTable } from "@/features/members/components/members-table";
import { getPageActor, getRoleChangesByUserId } from "@/features/members/server";
import { pageData } from "@/features/shared/server/page";
import { When } from "@/features/shared/components/when";

export const metadata = { title: "Members" };

export default async function MembersPage() {
  const actor = await getPageActor();
  const changes = await pageData(getRoleChangesByUserId({ actor }, undefined, 20));
  return (
    <div className="grid gap-8">
      <PageTitle lead="Choose a new role in a member's menu, then confirm it; the change takes effect when confirmed and is recorded below.">
        Members and roles
      </PageTitle>
      <MembersTable />
      <section>
        <h2 className="mb-2 text-xl font-bold text-peat-900">Recent role changes</h2>
        {changes.length === 0 ? (
          <p className="text-peat-700">No role has been changed yet.</p>
        ) : (
          <ul className="grid gap-1">
            {changes.map((c) => (
              <li key={c.id}>
                <When at={c.at} />: {c.actorName ?? "someone"} changed <strong>{c.memberName}</strong> from {c.fromRole}{" "}
                to {c.toRole}.
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
