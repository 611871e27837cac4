// Common camera sensor formats, so that a visitor without a saved kit can still
// see the framing. Sizes in mm are the usual nominal figures of each format
// (common practice; individual cameras differ by a few tenths of a millimetre).

export const SENSOR_FORMATS = [
  { key: "full-frame", label: "Full frame (36 × 24 mm)", widthMm: 36, heightMm: 24 },
  { key: "aps-c", label: "APS-C (23.5 × 15.6 mm)", widthMm: 23.5, heightMm: 15.6 },
  { key: "aps-c-small", label: "APS-C, smaller (22.3 × 14.9 mm)", widthMm: 22.3, heightMm: 14.9 },
  { key: "four-thirds", label: "Four Thirds (17.3 × 13 mm)", widthMm: 17.3, heightMm: 13 },
  { key: "one-inch", label: "1-inch type (13.2 × 8.8 mm)", widthMm: 13.2, heightMm: 8.8 },
  { key: "medium-44x33", label: "Medium format (43.8 × 32.9 mm)", widthMm: 43.8, heightMm: 32.9 },
] as const;

export type SensorFormatKey = (typeof SENSOR_FORMATS)[number]["key"];
export const SENSOR_FORMAT_KEYS = SENSOR_FORMATS.map((f) => f.key) as [SensorFormatKey, ...SensorFormatKey[]];

/**
 * The sensor a typed plan uses: both typed sizes win (whatever the list says); a format from
 * the list otherwise; none when neither is given (the drawing then shows rings only).
 */
export function resolveSensor(q: { sensor?: string; sw?: number; sh?: number }): { widthMm: number; heightMm: number } | null {
  if (q.sw !== undefined && q.sh !== undefined) return { widthMm: q.sw, heightMm: q.sh };
  const preset = SENSOR_FORMATS.find((f) => f.key === q.sensor);
  return preset ? { widthMm: preset.widthMm, heightMm: preset.heightMm } : null;
}
