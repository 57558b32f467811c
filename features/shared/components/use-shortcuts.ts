"use client";

import { useEffect, useRef } from "react";

/** True when a key press belongs to a field the person is typing in, so single-letter shortcuts must stay quiet. */
export function isTypingTarget(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false;
  if (target.isContentEditable) return true;
  const tag = target.tagName;
  if (tag === "TEXTAREA" || tag === "SELECT") return true;
  if (tag === "INPUT") {
    const type = (target as HTMLInputElement).type;
    return !["button", "submit", "reset", "checkbox", "radio", "file", "range", "color"].includes(type);
  }
  return false;
}

/**
 * Single-key shortcuts for a page (keys as KeyboardEvent.key: "j", "?", "Escape"). Ignored while typing in a field,
 * with Ctrl/Alt/Meta held (those belong to the browser and assistive technology), and while a dialog is open.
 */
export function useShortcuts(map: Record<string, (e: KeyboardEvent) => void>) {
  const ref = useRef(map);
  useEffect(() => {
    ref.current = map;
  });
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (e.defaultPrevented || e.ctrlKey || e.altKey || e.metaKey || isTypingTarget(e.target)) return;
      const run = ref.current[e.key];
      if (!run) return;
      e.preventDefault();
      run(e);
    };
    document.addEventListener("keydown", onKey);
    return () => document.removeEventListener("keydown", onKey);
  }, []);
}
