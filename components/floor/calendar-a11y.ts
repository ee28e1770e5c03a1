"use client";

import { useEffect, type RefObject } from "react";

/**
 * FullCalendar 6's timeline draws its slot and lane tables with aria-hidden="true", yet the
 * bookings inside them take focus (they open their build), which hides focusable content from
 * screen readers (axe-core aria-hidden-focus). The tables only lay things out, so they become
 * role="presentation" instead (the outer grid too); and the calendar's scrolling boxes get a tab stop, so that a
 * keyboard can scroll them (axe-core scrollable-region-focusable). Redone whenever the
 * calendar redraws its tables.
 */
export function useCalendarA11y(root: RefObject<HTMLElement | null>) {
  useEffect(() => {
    const el = root.current;
    if (!el) return;
    const fix = () => {
      for (const t of el.querySelectorAll('table[aria-hidden="true"]')) {
        t.removeAttribute("aria-hidden");
        t.setAttribute("role", "presentation");
      }
      // The outer scroll grid's role="grid" demands rows and cells as its only children; a
      // scrolling box with a tab stop inside it breaks that (axe-core aria-required-children).
      // It is a layout grid for the lanes and the time axis, not a data grid: presentation too.
      for (const g of el.querySelectorAll('table[role="grid"]')) g.setAttribute("role", "presentation");
      for (const s of el.querySelectorAll<HTMLElement>(".fc-scroller")) {
        const scrolls = s.scrollWidth > s.clientWidth + 1 || s.scrollHeight > s.clientHeight + 1;
        // A tab stop only: a named region role here would break the grid's table roles
        // (axe-core aria-required-children).
        if (scrolls && !s.hasAttribute("tabindex")) s.tabIndex = 0;
      }
    };
    fix();
    let queued = false;
    const observer = new MutationObserver(() => {
      if (queued) return;
      queued = true;
      requestAnimationFrame(() => {
        queued = false;
        fix();
      });
    });
    observer.observe(el, { childList: true, subtree: true });
    return () => observer.disconnect();
  }, [root]);
}
