/**
 * Tanklore's mark: a drop standing in a rounded tank, its lower part "water" in the reed accent.
 * Colours are the palette's (tailwind.config.ts: peat-700, paper, reed-300); app/icon.svg draws the same shape.
 */
export function LogoMark({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true" focusable="false">
      <rect width="32" height="32" rx="7" fill="#1d5444" />
      <path d="M16 4.5C16 4.5 8 14 8 20a8 8 0 0 0 16 0C24 14 16 4.5 16 4.5Z" fill="#f7f5ef" />
      <path d="M8.06 21q3.97-3 7.94 0t7.94 0A8 8 0 0 1 8.06 21Z" fill="#e7c27a" />
    </svg>
  );
}
