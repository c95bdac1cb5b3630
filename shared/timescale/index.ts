// The geologic time scale: ICS International Chronostratigraphic Chart v2024/12 as data, and lookups.
export { TIMESCALE_CITATION, TIMESCALE_VERSION, ICS_2024_12_ROWS, type ChartRank, type ChartRow } from "./ics2024-12";
export { timescaleUnits, timescaleStages, splitName, RANK_ORDER, type TimescaleRank, type TimescaleUnit } from "./units";
export { findUnit, stageBelow, unitsContaining, resolveIntervalRange } from "./lookup";
export { defaultWindowBelow, windowToStageBase, type DefaultWindow } from "./defaultWindow";
