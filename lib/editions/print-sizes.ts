// Layout slots of an edition and the pixel size each needs. Pure: numbers in,
// numbers out. width px = round(width mm / 25.4 x dpi) (25.4 mm to the inch);
// the height follows the rendition's aspect ratio. An export never enlarges
// the rendition without saying so: the result says whether, and by how much.
export const SLOT_PRESETS = ["single-column", "wide-column", "full-width", "cover", "web"] as const;
export type SlotPreset = (typeof SLOT_PRESETS)[number];
export type SlotKey = SlotPreset | "custom";
export const SLOT_KEYS: readonly SlotKey[] = [...SLOT_PRESETS, "custom"];

export interface SlotSpec {
  label: string;
  /** Printed width in millimetres; null for a screen slot measured in pixels. */
  widthMm: number | null;
  dpi: number | null;
  /** For screen slots: the width in pixels. */
  widthPx?: number;
}

/** Our presets: the society's column grid (88, 120 and 180 mm at 300 dpi), a cover and a screen size. */
export const SLOT_SPECS: Record<SlotPreset, SlotSpec> = {
  "single-column": { label: "Single column, 88 mm at 300 dpi", widthMm: 88, dpi: 300 },
  "wide-column": { label: "Wide column, 120 mm at 300 dpi", widthMm: 120, dpi: 300 },
  "full-width": { label: "Full width, 180 mm at 300 dpi", widthMm: 180, dpi: 300 },
  cover: { label: "Cover, 210 mm at 300 dpi", widthMm: 210, dpi: 300 },
  web: { label: "Web, 2048 px wide", widthMm: null, dpi: null, widthPx: 2048 },
};

export const CUSTOM_MM = { min: 10, max: 1000 } as const;
export const CUSTOM_DPI = { min: 72, max: 1200 } as const;
export const MM_PER_INCH = 25.4;

export interface PixelSize {
  width: number;
  height: number;
}

export interface SlotNeed {
  needed: PixelSize;
  available: PixelSize;
  /** needed width / available width, when above 1; null when the rendition is large enough. */
  enlargement: number | null;
  warning: string | null;
}

/** round(mm / 25.4 x dpi): the pixels a printed width needs at a resolution. */
export function pixelsForWidth(widthMm: number, dpi: number): number {
  if (!Number.isFinite(widthMm) || widthMm <= 0) throw new RangeError(`widthMm must be a positive number, got ${widthMm}`);
  if (!Number.isFinite(dpi) || dpi <= 0) throw new RangeError(`dpi must be a positive number, got ${dpi}`);
  return Math.round((widthMm / MM_PER_INCH) * dpi);
}

/** The width in pixels a slot asks for. */
export function slotWidthPx(slot: SlotKey, custom?: { widthMm: number; dpi: number } | null): number {
  if (slot === "custom") {
    if (!custom) throw new RangeError("a custom slot needs a width in mm and a dpi");
    return pixelsForWidth(custom.widthMm, custom.dpi);
  }
  const spec = SLOT_SPECS[slot];
  if (spec.widthMm !== null && spec.dpi !== null) return pixelsForWidth(spec.widthMm, spec.dpi);
  return spec.widthPx ?? 0;
}

/** What the slot needs against what the rendition offers, with a warning when the export would enlarge. */
export function compareWithRendition(slot: SlotKey, custom: { widthMm: number; dpi: number } | null, available: PixelSize): SlotNeed {
  if (!(available.width > 0 && available.height > 0)) throw new RangeError(`the rendition's size must be positive, got ${available.width} x ${available.height}`);
  const width = slotWidthPx(slot, custom);
  const needed = { width, height: Math.round((width * available.height) / available.width) };
  if (width <= available.width) return { needed, available, enlargement: null, warning: null };
  const enlargement = width / available.width;
  const pct = Math.round((enlargement - 1) * 100);
  return {
    needed,
    available,
    enlargement,
    warning: `This slot needs ${needed.width} x ${needed.height} px but the rendition has ${available.width} x ${available.height} px: it would have to be enlarged by ${pct}% (x${enlargement.toFixed(2)}). ${printedAs(slot, custom, available)} Choose a smaller slot or a lower dpi to print at full resolution.`,
  };
}

/** What the export does instead of enlarging: keeps the rendition's pixels, so a printed slot gets fewer dots per inch. */
function printedAs(slot: SlotKey, custom: { widthMm: number; dpi: number } | null, available: PixelSize): string {
  const spec = slot === "custom" ? custom : SLOT_SPECS[slot];
  if (!spec?.widthMm) return `The export keeps ${available.width} px rather than enlarge.`;
  const dpi = (available.width / spec.widthMm) * MM_PER_INCH;
  return `The export keeps ${available.width} px rather than enlarge, so it prints ${spec.widthMm} mm wide at ${dpi.toFixed(1)} dpi.`;
}

/** The largest printed width (mm) the rendition fills at a dpi without enlarging. */
export function maxWidthMm(available: PixelSize, dpi: number): number {
  return (available.width / dpi) * MM_PER_INCH;
}
