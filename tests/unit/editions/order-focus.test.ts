import { describe, expect, it } from "vitest";
import { focusAfterMove } from "@/components/editions/order-focus";

describe("focus after moving a plate", () => {
  it("stays on the pressed button while it can still move the plate", () => {
    expect(focusAfterMove("up", 2, 3)).toBe("up");
    expect(focusAfterMove("down", 2, 3)).toBe("down");
  });

  it("goes to the sibling when the move reached the top or the bottom", () => {
    expect(focusAfterMove("up", 1, 3)).toBe("down");
    expect(focusAfterMove("down", 3, 3)).toBe("up");
  });

  it("goes nowhere when a single plate can move neither way", () => {
    expect(focusAfterMove("up", 1, 1)).toBeNull();
    expect(focusAfterMove("down", 1, 1)).toBeNull();
  });
});
