// How dates and counts read everywhere in the app.

const dateFormat = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric" });
const dateTimeFormat = new Intl.DateTimeFormat("en-GB", {
  day: "numeric",
  month: "short",
  year: "numeric",
  hour: "2-digit",
  minute: "2-digit",
});
const numberFormat = new Intl.NumberFormat("en-GB");

function toDate(value: string | Date): Date | null {
  const date = value instanceof Date ? value : new Date(value);
  return Number.isNaN(date.getTime()) ? null : date;
}

/** "3 Mar 2026" */
export function formatDate(value: string | Date): string {
  const date = toDate(value);
  return date ? dateFormat.format(date) : "—";
}

/** "3 Mar 2026, 14:05" in the viewer's time zone. */
export function formatDateTime(value: string | Date): string {
  const date = toDate(value);
  return date ? dateTimeFormat.format(date) : "—";
}

/** "1,204" */
export function formatCount(value: number): string {
  return numberFormat.format(value);
}

/** "1 member", "3 members"; pass the plural when it is not the singular plus "s". */
export function pluralize(count: number, singular: string, plural = `${singular}s`): string {
  return `${formatCount(count)} ${count === 1 ? singular : plural}`;
}

/** Initials for an avatar: "Ada Stone" -> "AS". */
export function initials(name: string): string {
  const parts = name.trim().split(/\s+/).filter(Boolean);
  if (parts.length === 0) return "?";
  const first = parts[0][0] ?? "";
  const last = parts.length > 1 ? (parts[parts.length - 1][0] ?? "") : "";
  return (first + last).toUpperCase();
}
