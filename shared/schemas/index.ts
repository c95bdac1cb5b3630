export * from "./common";
export * from "./auth";
export * from "./studies";
export * from "./outbox";
export * from "./health";
export * from "./timescale";
export * from "./outcomes";
