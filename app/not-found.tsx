import Link from "next/link";

export default function NotFound() {
  return (
    <div className="max-w-xl">
      <h1 className="text-3xl font-bold text-peat-900">Nothing here</h1>
      <p className="mt-3">
        That page does not exist, or you may not see it. Check the address, or go back to the{" "}
        <Link href="/">start page</Link>.
      </p>
    </div>
  );
}
