import type { IucnCategory } from "@shared/iucn";
import { IUCN_CATEGORY_NAMES } from "@shared/iucn";
import { cx } from "../../lib/cx";
import { categoryTone } from "./words";

/** A threat category as a small code with its full name for screen readers and on hover. */
export function CategoryBadge({ category }: { category: IucnCategory }) {
  return (
    <abbr title={IUCN_CATEGORY_NAMES[category]} className={cx("inline-flex min-w-8 justify-center rounded px-1.5 py-0.5 text-xs font-semibold no-underline ring-1 ring-inset", categoryTone(category))}>
      {category}
    </abbr>
  );
}
