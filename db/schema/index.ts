export * from "./auth";
export * from "./jobs";
export * from "./society";
export * from "./mail";
export * from "./sky";
export * from "./brackets";
export * from "./reductions";
export * from "./plates";
