// A study's own time bins: how interval names resolve (bins first, then the ICS chart) and reading a bin file.
export { binsShadowingChart, chartInterval, closestBinNames, hasBins, INTERVAL_RESOLUTION_ORDER, intervalLookup, isNumberName, numberedIntervalHint, timeBinKey, type IntervalLookup, type ResolvedInterval, type TimeBinLike } from "./intervalLookup";
export { readTimeBinCsv, timeBinColumns } from "./readTimeBinCsv";
