"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useEffect, useRef, useState } from "react";
import { BrandMark } from "./brand-mark";
import { NavLinks, type NavLinksProps } from "./nav-links";

export type MenuDrawerProps = { items: NavLinksProps["items"]; userSlot: React.ReactNode };

const FOCUSABLE = 'a[href], button:not([disabled]), input:not([disabled]), select:not([disabled]), textarea:not([disabled]), [tabindex]:not([tabindex="-1"])';

/**
 * Below the md breakpoint the sidebar would take most of a phone's width, so the shell becomes a
 * top bar whose menu button opens the same navigation in a drawer. The drawer is a modal dialog
 * (WAI-ARIA Authoring Practices, "Dialog (Modal)" pattern): focus moves into it, Tab stays inside,
 * Escape or a link closes it and focus returns to the button.
 */
export function MenuDrawer({ items, userSlot }: MenuDrawerProps) {
  const [open, setOpen] = useState(false);
  const pathname = usePathname();
  const button = useRef<HTMLButtonElement>(null);
  const panel = useRef<HTMLDivElement>(null);

  // A followed link closes the drawer.
  const [seenPath, setSeenPath] = useState(pathname);
  if (seenPath !== pathname) {
    setSeenPath(pathname);
    setOpen(false);
  }

  useEffect(() => {
    if (!open) return;
    const el = panel.current;
    el?.querySelector<HTMLElement>(FOCUSABLE)?.focus();
    const onKey = (e: KeyboardEvent) => {
      if (e.key === "Escape") {
        e.preventDefault();
        setOpen(false);
        button.current?.focus();
        return;
      }
      if (e.key !== "Tab" || !el) return;
      const nodes = [...el.querySelectorAll<HTMLElement>(FOCUSABLE)].filter((n) => n.offsetParent !== null);
      if (!nodes.length) return;
      const first = nodes[0];
      const last = nodes[nodes.length - 1];
      if (e.shiftKey && document.activeElement === first) {
        e.preventDefault();
        last.focus();
      } else if (!e.shiftKey && document.activeElement === last) {
        e.preventDefault();
        first.focus();
      }
    };
    document.addEventListener("keydown", onKey);
    const overflow = document.body.style.overflow;
    document.body.style.overflow = "hidden";
    return () => {
      document.removeEventListener("keydown", onKey);
      document.body.style.overflow = overflow;
    };
  }, [open]);

  return (
    <div className="no-print md:hidden">
      <div className="sticky top-0 z-40 flex h-14 items-center gap-3 bg-soot-900 px-3 text-soot-100">
        <button
          ref={button}
          type="button"
          aria-expanded={open}
          aria-controls="menu-drawer"
          onClick={() => setOpen((o) => !o)}
          className="inline-flex h-11 w-11 items-center justify-center rounded-md text-soot-100 hover:bg-soot-800"
          data-testid="menu-button"
        >
          <svg viewBox="0 0 24 24" className="h-6 w-6" aria-hidden="true">
            <path d="M4 7h16M4 12h16M4 17h16" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
          </svg>
          <span className="sr-only">Menu</span>
        </button>
        <Link href="/" className="tap-target flex items-center gap-2 text-clay-300">
          <BrandMark className="h-6 w-6" />
          <span className="font-display text-lg font-semibold text-soot-50">Hearth</span>
        </Link>
      </div>
      {open ? (
        <div className="fixed inset-0 z-50 flex">
          <div className="absolute inset-0 bg-soot-950/60" aria-hidden="true" onClick={() => setOpen(false)} />
          <div
            ref={panel}
            id="menu-drawer"
            role="dialog"
            aria-modal="true"
            aria-label="Menu"
            className="relative flex h-full w-72 max-w-[85vw] flex-col overflow-y-auto bg-soot-900 text-soot-100 shadow-xl"
          >
            <div className="flex items-center justify-between px-4 py-3">
              <span className="font-display text-lg font-semibold text-soot-50">Hearth</span>
              <button
                type="button"
                onClick={() => {
                  setOpen(false);
                  button.current?.focus();
                }}
                className="inline-flex h-11 min-w-11 items-center justify-center rounded-md px-2 text-sm text-soot-200 hover:bg-soot-800"
              >
                Close
              </button>
            </div>
            <NavLinks items={items} />
            <div className="mt-auto border-t border-soot-700 px-5 py-4 text-sm">{userSlot}</div>
          </div>
        </div>
      ) : null}
    </div>
  );
}
