// Layout checks in the browser: nothing wider than the window, so a phone never scrolls sideways.
import type { Page } from "playwright-core";
import { expect } from "vitest";

/** Asserts document.documentElement.scrollWidth <= innerWidth, naming the widest elements that stick out when it fails. */
export async function expectNoSidewaysScroll(page: Page): Promise<void> {
  const { scrollWidth, innerWidth, culprits } = await page.evaluate(() => {
    const width = window.innerWidth;
    const out = [...document.querySelectorAll("body *")]
      .map((el) => ({ el, right: el.getBoundingClientRect().right }))
      .filter((x) => x.right > width + 0.5)
      // The innermost elements that stick out say more than their containers.
      .filter((x) => ![...x.el.children].some((c) => c.getBoundingClientRect().right > width + 0.5))
      .slice(0, 6)
      .map((x) => `${x.el.tagName.toLowerCase()}.${String(x.el.getAttribute("class") ?? "").split(" ").slice(0, 4).join(".")} (right edge ${Math.round(x.right)} px)`);
    return { scrollWidth: document.documentElement.scrollWidth, innerWidth: width, culprits: out };
  });
  expect(scrollWidth, `the page is ${scrollWidth} px wide in a ${innerWidth} px window; sticking out: ${culprits.join("; ")}`).toBeLessThanOrEqual(innerWidth);
}
