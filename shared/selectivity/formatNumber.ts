/**
 * A number for a sentence or a label, to about three significant figures without exponent notation
 * for everyday magnitudes: 2.8046 -> "2.80", 0.01234 -> "0.0123", 1234.4 -> "1234", 0 -> "0";
 * beyond them exponent notation (3.2e-7).
 *
 * @example
 * formatNumber(2.8046) // => "2.80"
 */
export function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return "0";
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-4) return value.toPrecision(3);
  if (magnitude >= 100) return value.toFixed(0);
  if (magnitude >= 10) return value.toFixed(1);
  if (magnitude >= 1) return value.toFixed(2);
  return value.toPrecision(3);
}

/**
 * A number for a short label, three significant figures without trailing zeros: 2 -> "2",
 * 13.04 -> "13", 0.4529 -> "0.453", 1234.5 -> "1230".
 *
 * @example
 * formatCompact(2.0) // => "2"
 */
export function formatCompact(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  const rounded = Number(value.toPrecision(3));
  const magnitude = Math.abs(rounded);
  return magnitude !== 0 && (magnitude >= 1e6 || magnitude < 1e-4) ? rounded.toPrecision(3) : String(rounded);
}

/**
 * A recorded measurement as entered (up to ten significant figures, so 0.1 + 0.2 reads "0.3"),
 * with its unit when it has one: 12.5, "mm" -> "12.5 mm"; 66, "Ma" -> "66 Ma".
 *
 * @example
 * formatMeasurement(12.5, "mm") // => "12.5 mm"
 */
export function formatMeasurement(value: number, unit?: string | null): string {
  const text = Number.isInteger(value) ? String(value) : String(Number(value.toPrecision(10)));
  return unit ? `${text} ${unit}` : text;
}
