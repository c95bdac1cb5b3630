import { Link, type LinkProps } from "react-router-dom";
import { focusRing } from "./focus";
import { cx } from "../lib/cx";

export const textLinkClasses = cx(
  "rounded-sm font-medium text-accent-700 underline decoration-accent-200 decoration-2 underline-offset-2 hover:text-accent-900 hover:decoration-accent-500",
  focusRing,
);

/** A link inside running text. */
export function TextLink({ className, ...rest }: LinkProps) {
  return <Link className={cx(textLinkClasses, typeof className === "string" ? className : undefined)} {...rest} />;
}
