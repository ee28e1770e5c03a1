export type ScrollRegionProps = { label: string; children: React.ReactNode; className?: string };

/**
 * A wide table scrolls sideways inside its own box on a phone instead of the whole page. The box
 * is focusable and named, so keyboard users can scroll it too (WCAG 2.1.1; axe-core's
 * scrollable-region-focusable rule). It is the containing block of what it holds, so a visually
 * hidden (absolutely placed) header inside a wide table is clipped with it and cannot widen the page.
 */
export function ScrollRegion({ label, children, className = "" }: ScrollRegionProps) {
  return (
    <div role="region" aria-label={label} tabIndex={0} className={`relative max-w-full overflow-x-auto ${className}`}>
      {children}
    </div>
  );
}
