"use client";

import { useEffect, type RefObject } from "react";

/** FullCalendar's table roles: its outer scroll grid says grid/rowgroup/row/cell, its lane list row/gridcell. */
const TABLE_PARTS = 'table, thead, tbody, tfoot, tr, th, td, [role="grid"], [role="rowgroup"], [role="row"], [role="columnheader"], [role="rowheader"], [role="gridcell"]';

/**
 * FullCalendar 6's resource timeline is a layout of nested tables: an outer role="grid" whose
 * cells hold scrolling boxes, which hold more tables (the lane names, the time axis, the lanes
 * with their bookings), some of them aria-hidden="true" although the bookings inside take focus.
 * Read as a grid, it breaks three axe-core rules at once: aria-hidden-focus (focusable bookings
 * in hidden tables), scrollable-region-focusable (a box that scrolls needs a tab stop), and,
 * once a scrolling box has that tab stop, aria-required-children/-parent (a rowgroup may hold
 * only rows, and a rowgroup, row or cell needs its grid or table above it). Making only the outer
 * table presentational leaves its thead/tbody/tfoot as rowgroups without a grid.
 *
 * The tables only lay things out: what a person needs is in the lane names and the bookings
 * (each a link or button with its own words). So every table part inside the calendar becomes
 * role="presentation", no table is aria-hidden, and each scrolling box becomes a named group
 * with a tab stop. Redone whenever the calendar redraws its tables.
 */
export function useCalendarA11y(root: RefObject<HTMLElement | null>) {
  useEffect(() => {
    const el = root.current;
    if (!el) return;
    const fix = () => {
      for (const t of el.querySelectorAll('table[aria-hidden="true"]')) t.removeAttribute("aria-hidden");
      for (const n of el.querySelectorAll(TABLE_PARTS)) {
        if (n.getAttribute("role") !== "presentation") n.setAttribute("role", "presentation");
      }
      for (const s of el.querySelectorAll<HTMLElement>(".fc-scroller")) {
        const scrolls = s.scrollWidth > s.clientWidth + 1 || s.scrollHeight > s.clientHeight + 1;
        if (scrolls && !s.hasAttribute("tabindex")) {
          s.tabIndex = 0;
          // A generic box may not carry a name (axe-core aria-prohibited-attr); a group may.
          s.setAttribute("role", "group");
          s.setAttribute("aria-label", "Timeline, scrolls with the arrow keys");
        }
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
