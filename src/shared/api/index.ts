/** The API contract: response shapes of every endpoint, shared by the route handlers and the browser. */
export * from "./common";
export * from "./runs";
export * from "./sweeps";
export * from "./networks";
export * from "./fits";
export * from "./datasets";
export * from "./billing";
export * from "./workspace";
export * from "./tokens";
export * from "./routes";
