export * from "./accounts";
export * from "./studies";
export * from "./mail";
export * from "./timescale";
