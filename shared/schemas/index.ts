export * from "./auth";
export * from "./studies";
export * from "./errors";
export * from "./review";
