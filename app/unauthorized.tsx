import Link from "next/link";

// Shown (with status 401) when a page's data function needs a signed-in caller.
export default function Unauthorized() {
  return (
    <div className="max-w-xl">
      <h1 className="text-3xl font-bold text-peat-900">Sign in first</h1>
      <p className="mt-3">
        This page is for the club&apos;s members. <Link href="/sign-in">Sign in</Link>, or{" "}
        <Link href="/sign-up">join</Link>.
      </p>
    </div>
  );
}
