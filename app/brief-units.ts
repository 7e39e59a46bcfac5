// Showing a brief's stored SI numbers in the reader's unit system (conversions live in analysis/units.ts).
import type { BriefSection } from "../analysis/briefs";
import { UNITS, type UnitSystem } from "../analysis/units";

/** Converts a stored value (or a difference of two) of a section's variable to the reader's units. */
export function inReaderUnits(section: BriefSection, value: number | null, system: UnitSystem): number | null {
  if (value === null) return null;
  const unit = section.variable.siUnit ? UNITS[section.variable.siUnit] : null;
  return system === "us" && unit ? unit.toUs(value) : value;
}

export function unitLabel(section: BriefSection, system: UnitSystem): string {
  const unit = section.variable.siUnit ? UNITS[section.variable.siUnit] : null;
  if (!unit) return section.variable.unit;
  return system === "us" ? unit.us : unit.si;
}

export function citation(input: { authors: string; year: number; title: string; version: number; program: string; url: string }): string {
  return `${input.authors} (${input.year}). ${input.title}. Tilthmark field brief, version ${input.version}. ${input.program}. ${input.url}`;
}
