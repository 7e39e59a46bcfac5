// DESIGN.md "Cautions, shown where the work happens": the amendment, application-sheet and sampling wording, in one place.

export const PATHOGEN_HANDLING_CAUTION =
  "Manure and immature compost can carry pathogens. Wear gloves, wash hands and tools after handling, keep it off " +
  "produce, and observe the interval required before harvesting food crops from treated plots.";

export const NUTRIENT_LOADING_CAUTION =
  "The nitrogen and phosphorus that amendments add fall under local nutrient-management rules; large or repeated " +
  "rates can exceed them. Check the loads below against the rules that apply to the site.";

/** Wherever the crew drives a probe, ring or stake into the ground or digs: the sampling pages, the plot map and the application sheet. */
export const BURIED_UTILITIES_CAUTION =
  "Locate buried utilities before driving a probe, ring or stake or digging: call your local utility-locating (one-call) " +
  "service, wait for the marks, and follow the local rules for working near them.";

export const DEFER_TO_LOCAL =
  "Tilthmark gives estimates for research, not regulatory compliance: local codes, institutional safety offices and " +
  "licensed practice come first.";

/** Materials that carry the pathogen caution on amendment pages. */
export const PATHOGEN_MATERIALS = new Set(["compost", "manure", "microbial_drench"]);

/** Materials for which a composting temperature log and the pathogen-reduction check apply. */
export const TEMPERATURE_LOG_MATERIALS = new Set(["compost", "manure"]);

export const MATERIAL_LABELS: Record<string, string> = {
  compost: "Compost",
  leaf_mould: "Leaf mould",
  spent_coffee_grounds: "Spent coffee grounds",
  manure: "Manure",
  biochar: "Biochar",
  cardboard: "Cardboard / sheet mulch",
  microbial_drench: "Microbial drench",
  fungal_inoculant: "Fungal inoculant",
  other: "Other",
};

export const TIMING_LABELS: Record<string, string> = {
  once: "Once, at set-up",
  each_season: "Each season",
  every_n_weeks: "Every N weeks",
};

export function timingText(timing: string, everyNWeeks: number | null): string {
  if (timing === "every_n_weeks") return everyNWeeks ? `Every ${everyNWeeks} week${everyNWeeks === 1 ? "" : "s"}` : "Every N weeks";
  return TIMING_LABELS[timing] ?? timing;
}

export const COMPOSTING_METHOD_LABELS: Record<string, string> = {
  turned_windrow: "Turned windrow",
  static_pile: "Static pile (aerated)",
  in_vessel: "In-vessel",
};
