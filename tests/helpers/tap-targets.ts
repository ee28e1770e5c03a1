import type { Page } from "playwright-core";

/**
 * The controls on a touch screen whose hit area is under 44 × 44 CSS px (WCAG 2.2 success
 * criterion 2.5.5, Target Size). The hit area is the element's box grown by an absolutely placed
 * ::after (the way a small link in a list is given a finger-sized area). Exempt, as 2.5.5 itself
 * exempts them: a link inside a sentence (inline, with text of its own line around it), a
 * checkbox or radio inside a label that is large enough, and anything not shown (or hidden
 * to the eye and worked through its label).
 */
export async function smallTapTargets(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const MIN = 44 - 0.5;
    const out: string[] = [];
    const describe = (el: Element) => {
      const text = (el.textContent ?? "").trim().replace(/\s+/g, " ").slice(0, 40) || el.getAttribute("aria-label") || el.getAttribute("title") || "";
      return `<${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}> "${text}"`;
    };
    const box = (el: Element) => {
      const r = el.getBoundingClientRect();
      let { top, bottom, left, right } = r;
      const after = getComputedStyle(el, "::after");
      if (after.content !== "none" && after.position === "absolute") {
        const px = (v: string) => (v.endsWith("px") ? parseFloat(v) : 0);
        top = Math.min(top, r.top + px(after.top));
        bottom = Math.max(bottom, r.bottom - px(after.bottom));
        left = Math.min(left, r.left + px(after.left));
        right = Math.max(right, r.right - px(after.right));
      }
      return { w: right - left, h: bottom - top };
    };
    const inSentence = (el: Element) => {
      if (getComputedStyle(el).display !== "inline") return false;
      const parent = el.parentElement;
      if (!parent) return false;
      return [...parent.childNodes].some((n) => n !== el && n.nodeType === Node.TEXT_NODE && /[A-Za-z0-9]/.test(n.textContent ?? ""));
    };
    const selector = "a[href], button, select, summary, [role='button'], [role='tab'], input:not([type='hidden'])";
    for (const el of document.querySelectorAll(selector)) {
      const r = el.getBoundingClientRect();
      // Not shown, or visually hidden and worked through its label (a camera or file input).
      if (r.width <= 1 || r.height <= 1) continue;
      const cs = getComputedStyle(el);
      if (cs.visibility === "hidden" || el.closest("[aria-hidden='true'], [inert]")) continue;
      if (el instanceof HTMLInputElement && (el.type === "checkbox" || el.type === "radio")) {
        const label = el.closest("label");
        const b = label ? box(label) : box(el);
        if (b.h >= MIN || (label && label.getBoundingClientRect().height >= MIN)) continue;
        out.push(`${describe(label ?? el)} ${b.w.toFixed(0)}×${b.h.toFixed(0)}`);
        continue;
      }
      if (inSentence(el)) continue;
      const b = box(el);
      if (b.w < MIN || b.h < MIN) out.push(`${describe(el)} ${b.w.toFixed(0)}×${b.h.toFixed(0)}`);
    }
    return out;
  });
}
