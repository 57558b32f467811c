import Link from "next/link";
import { ArrowLeft } from "lucide-react";
import type { ReactNode } from "react";

/** "Back to the list" link at the top of a detail page, with an arrow icon instead of a text glyph. */
export function BackLink({ href, children }: { href: string; children: ReactNode }) {
  return (
    <p>
      <Link href={href} className="inline-flex items-center gap-1">
        <ArrowLeft className="h-4 w-4 shrink-0" aria-hidden="true" />
        {children}
      </Link>
    </p>
  );
}
