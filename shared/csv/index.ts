// CSV reading, checking and writing for trait-table imports and exports (pure; client and server).
export * from "./parse";
export * from "./values";
export * from "./mapping";
export * from "./validate";
export * from "./write";
