"use client";

import { LogOut } from "lucide-react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { authClient } from "../auth-client";

export function SignOutButton({
  className = "flex items-center gap-1.5 rounded px-2 py-1 text-peat-100 underline hover:text-white",
}: {
  className?: string;
}) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  return (
    <button
      type="button"
      disabled={busy}
      className={className}
      onClick={async () => {
        setBusy(true);
        await authClient.signOut();
        router.push("/");
        router.refresh();
      }}
    >
      <LogOut className="h-4 w-4 shrink-0" aria-hidden="true" />
      {busy ? "Signing out…" : "Sign out"}
    </button>
  );
}
