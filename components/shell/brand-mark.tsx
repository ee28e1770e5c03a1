/** Hearth's mark: a kiln arch over three embers. */
export function BrandMark({ className = "h-7 w-7" }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <path d="M4 28V15a12 12 0 0 1 24 0v13" fill="none" stroke="currentColor" strokeWidth="2.5" strokeLinecap="round" />
      <path d="M9 28v-9a7 7 0 0 1 14 0v9" fill="none" stroke="currentColor" strokeWidth="1.5" opacity="0.55" />
      <circle cx="12" cy="25" r="1.8" fill="#f26a12" />
      <circle cx="16" cy="23.5" r="2.2" fill="#ff8a3d" />
      <circle cx="20" cy="25" r="1.8" fill="#f26a12" />
    </svg>
  );
}
