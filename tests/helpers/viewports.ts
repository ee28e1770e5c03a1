/** The widths every page is checked at: a phone and a tablet (touch) and a desktop (mouse). */
export const WIDTHS = {
  phone: { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true },
  tablet: { viewport: { width: 820, height: 1180 }, isMobile: true, hasTouch: true },
  desktop: { viewport: { width: 1280, height: 800 }, isMobile: false, hasTouch: false },
} as const;
export type Width = keyof typeof WIDTHS;
