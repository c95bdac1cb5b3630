/** Joins the class names that apply, skipping false, null and undefined: cx("a", on && "b"). */
export function cx(...classes: Array<string | false | null | undefined>): string {
  return classes.filter(Boolean).join(" ");
}
