// Which order button keeps the keyboard focus after a plate moves: the one that
// was pressed, unless the move left it disabled at the top or bottom, then its
// sibling; none when the edition holds a single plate.
export type OrderDirection = "up" | "down";

export function focusAfterMove(pressed: OrderDirection, position: number, count: number): OrderDirection | null {
  const canUp = position > 1;
  const canDown = position < count;
  if (pressed === "up") return canUp ? "up" : canDown ? "down" : null;
  return canDown ? "down" : canUp ? "up" : null;
}
