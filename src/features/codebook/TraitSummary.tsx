import type { ReactNode } from "react";
import type { Trait } from "@shared/schemas/traits";

const KIND_NAMES: Record<Trait["kind"], string> = { binary: "Binary", categorical: "Categorical", ordinal: "Ordinal", numeric: "Numeric" };

function Tag({ children, tone = "stone" }: { children: ReactNode; tone?: "stone" | "accent" }) {
  return (
    <span
      className={
        tone === "accent"
          ? "inline-flex items-center rounded-full bg-accent-50 px-2 py-0.5 text-xs font-semibold text-accent-900 ring-1 ring-accent-200"
          : "inline-flex items-center rounded-full bg-stone-100 px-2 py-0.5 text-xs font-semibold text-stone-700 ring-1 ring-stone-200"
      }
    >
      {children}
    </span>
  );
}

/** A trait as the codebook reads: name, key, kind, what it describes, its states or unit, its rule. */
export function TraitSummary({ trait, actions }: { trait: Trait; actions?: ReactNode }) {
  const states = [...trait.states].sort((a, b) => a.order - b.order);
  return (
    <article aria-labelledby={`trait-${trait.id}`} className="min-w-0 flex-1">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <h3 id={`trait-${trait.id}`} className="font-semibold text-stone-900">
            {trait.label}
          </h3>
          <p className="mt-1 flex flex-wrap items-center gap-2 text-sm">
            <span className="font-mono text-stone-500">{trait.key}</span>
            <Tag>{KIND_NAMES[trait.kind]}</Tag>
            <Tag tone={trait.aspect === "ecology" ? "accent" : "stone"}>{trait.aspect === "ecology" ? "Ecology" : "Other"}</Tag>
          </p>
        </div>
        {actions && <div className="flex shrink-0 flex-wrap items-center gap-1">{actions}</div>}
      </div>
      {trait.kind === "numeric" ? (
        <dl className="mt-3 flex flex-wrap gap-x-6 gap-y-1 text-sm">
          <div className="flex gap-1.5">
            <dt className="text-stone-500">Unit</dt>
            <dd className="text-stone-800">{trait.unit ?? "none"}</dd>
          </div>
          <div className="flex gap-1.5">
            <dt className="text-stone-500">In analyses</dt>
            <dd className="text-stone-800">{trait.transform === "log10" ? "log₁₀ of the value" : "as given"}</dd>
          </div>
          <div className="flex gap-1.5">
            <dt className="text-stone-500">Allowed</dt>
            <dd className="text-stone-800 tabular-nums">
              {trait.minValue === null && trait.maxValue === null
                ? "any number"
                : `${trait.minValue ?? "−∞"} to ${trait.maxValue ?? "∞"}${trait.unit ? ` ${trait.unit}` : ""}`}
            </dd>
          </div>
        </dl>
      ) : (
        <ol className="mt-3 flex flex-wrap gap-1.5" aria-label={`States of ${trait.label}`}>
          {states.map((s, i) => (
            <li key={s.code} className="inline-flex items-baseline gap-1.5 rounded-md border border-stone-200 bg-stone-50 px-2 py-0.5 text-sm">
              {trait.kind === "ordinal" && <span className="text-xs text-stone-500 tabular-nums">{i + 1}</span>}
              <span className="font-mono text-stone-600">{s.code}</span>
              <span className="text-stone-900">{s.label}</span>
            </li>
          ))}
        </ol>
      )}
      {trait.codingRule ? (
        <p className="mt-3 text-sm whitespace-pre-line text-stone-700">
          <span className="font-medium text-stone-900">Coding rule. </span>
          {trait.codingRule}
        </p>
      ) : (
        <p className="mt-3 text-sm text-stone-500 italic">No coding rule written yet.</p>
      )}
    </article>
  );
}
