export * from "./accounts";
export * from "./studies";
export * from "./mail";
export * from "./timescale";
export * from "./traits";
export * from "./outcomes";
export * from "./analysis";
export * from "./discussion";
