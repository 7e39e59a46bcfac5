export * from "./application";
export * from "./carbon-nitrogen";
export * from "./pathogen-reduction";
