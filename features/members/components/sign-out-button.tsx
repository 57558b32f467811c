"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { authClient } from "../auth-client";

export function SignOutButton() {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  return (
    <button
      type="button"
      disabled={busy}
      className="rounded px-2 py-1 text-peat-100 underline hover:text-white"
      onClick={async () => {
        setBusy(true);
        await authClient.signOut();
        router.push("/");
        router.refresh();
      }}
    >
      Sign out
    </button>
  );
}
