// One file per domain; each later feature adds its own file and a line here.
import "../../server-only";
export * from "./accounts";
export * from "./compute";
export * from "./invitations";
export * from "./data";
export * from "./billing";
