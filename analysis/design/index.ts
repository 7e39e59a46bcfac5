export * from "./random";
export * from "./layouts";
export * from "./power";
