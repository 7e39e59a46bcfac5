export * from "./errors";
export * from "./loss-on-ignition";
export * from "./organic-matter";
export * from "./bulk-density";
export * from "./moisture";
export * from "./depth-increments";
export * from "./soc-stock";
