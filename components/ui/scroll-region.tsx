export type ScrollRegionProps = { label: string; children: React.ReactNode; className?: string };

/**
 * A wide table scrolls sideways inside its own box on a phone instead of the whole page. The box
 * is focusable and named, so keyboard users can scroll it too (WCAG 2.1.1; axe-core's
 * scrollable-region-focusable rule).
 */
export function ScrollRegion({ label, children, className = "" }: ScrollRegionProps) {
  return (
    <div role="region" aria-label={label} tabIndex={0} className={`max-w-full overflow-x-auto ${className}`}>
      {children}
    </div>
  );
}
