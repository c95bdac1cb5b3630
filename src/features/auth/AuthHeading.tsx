import type { ReactNode } from "react";

/** The heading of a sign-in style panel. */
export function AuthHeading({ title, children }: { title: ReactNode; children?: ReactNode }) {
  return (
    <div className="mb-6">
      <h1 className="text-2xl font-semibold tracking-tight text-stone-900">{title}</h1>
      {children && <div className="mt-2 text-[15px] text-stone-600">{children}</div>}
    </div>
  );
}
