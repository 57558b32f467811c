"use client";

import { usePathname } from "next/navigation";
import { useEffect, useId, useRef, useState, type ReactNode } from "react";

/**
 * A <details> disclosure (so it opens without JavaScript too) that also closes on Escape — returning focus to its
 * button —, on a click outside, and after a navigation from inside it.
 */
export function Disclosure({
  label,
  children,
  className,
  summaryClassName,
  panelClassName,
  testId,
}: {
  label: ReactNode;
  children: ReactNode;
  className?: string;
  summaryClassName?: string;
  panelClassName?: string;
  testId?: string;
}) {
  const ref = useRef<HTMLDetailsElement>(null);
  const panelId = useId();
  const [open, setOpen] = useState(false);
  const pathname = usePathname();

  useEffect(() => {
    if (ref.current) ref.current.open = false;
  }, [pathname]);

  useEffect(() => {
    if (!open) return;
    const onPointer = (e: PointerEvent) => {
      if (ref.current && !ref.current.contains(e.target as Node)) ref.current.open = false;
    };
    document.addEventListener("pointerdown", onPointer);
    return () => document.removeEventListener("pointerdown", onPointer);
  }, [open]);

  return (
    <details
      ref={ref}
      className={className}
      data-testid={testId}
      onToggle={(e) => setOpen(e.currentTarget.open)}
      onKeyDown={(e) => {
        if (e.key !== "Escape" || !ref.current?.open) return;
        e.preventDefault();
        ref.current.open = false;
        ref.current.querySelector("summary")?.focus();
      }}
    >
      <summary aria-expanded={open} aria-controls={panelId} className={summaryClassName}>
        {label}
      </summary>
      <div id={panelId} className={panelClassName}>
        {children}
      </div>
    </details>
  );
}
