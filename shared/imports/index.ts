// Checks every import runs beside its row errors (pure; client and server): declared missing-value
// tokens, implausible ages, names differing only by case, spacing or punctuation, qualified higher taxa.
export * from "./missingTokens";
export * from "./agePlausibility";
export * from "./nameHygiene";
export * from "./qualifiedHigherTaxon";
export * from "./importChecks";
