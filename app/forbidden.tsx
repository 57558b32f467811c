import Link from "next/link";

// Shown (with status 403) when a page's data function refuses the signed-in caller's role.
export default function Forbidden() {
  return (
    <div className="max-w-xl">
      <h1 className="text-3xl font-bold text-peat-900">Not for your role</h1>
      <p className="mt-3">
        This page is for club moderators or officers. If you think you should have access, ask a club officer.{" "}
        <Link href="/">Back to the start</Link>.
      </p>
    </div>
  );
}
