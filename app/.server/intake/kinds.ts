// What each kind of lab result looks like as a CSV: its columns, their units and the names a lab
// might give them. Pure: used by parsing, validation, templates and the manual-entry grid.

export type FieldType = "code" | "number" | "text";

export interface FieldDef {
  /** Key in measurement.inputs. */
  key: string;
  /** Column header in Tilthmark's templates. */
  header: string;
  /** Words for people, with the unit. */
  label: string;
  type: FieldType;
  required: boolean;
  /** Other headers that mean the same column (compared after normalizing case, spaces, punctuation). */
  aliases: string[];
  /** A value shown in how-to-fix sentences. */
  example?: string;
  /** Masses, dimensions and temperatures cannot be negative. */
  nonNegative?: boolean;
}

export interface KindDef {
  id: string;
  label: string;
  /** One line about the kind for the intake page. */
  summary: string;
  fields: FieldDef[];
  /** Which derived number the outlier check looks at. */
  outlierVariable: string;
}

const sampleCode: FieldDef = {
  key: "sampleCode",
  header: "sample_code",
  label: "Sample code",
  type: "code",
  required: true,
  aliases: ["sample", "code", "sample id", "sampleid", "bag", "bag code"],
  example: "E1-101-0-10",
};
const notes: FieldDef = { key: "notes", header: "notes", label: "Notes", type: "text", required: false, aliases: ["note", "comment", "comments", "remarks"] };

export const LOI_KIND: KindDef = {
  id: "loi",
  label: "Loss on ignition (LOI)",
  summary: "Three weighings per crucible: empty, with oven-dry soil, with the ignited residue.",
  outlierVariable: "loi",
  fields: [
    sampleCode,
    { key: "crucibleG", header: "crucible_g", label: "Crucible (g)", type: "number", required: true, aliases: ["crucible", "tare", "tare g", "crucible mass g", "empty crucible g"], example: "20.512" },
    { key: "crucibleDrySoilG", header: "crucible_dry_soil_g", label: "Crucible + oven-dry soil (g)", type: "number", required: true, aliases: ["crucible plus dry soil g", "dry", "dry g", "crucible dry g", "crucible + dry soil g", "crucible oven dry soil g"], example: "30.514" },
    { key: "crucibleResidueG", header: "crucible_residue_g", label: "Crucible + ignited residue (g)", type: "number", required: true, aliases: ["crucible plus residue g", "ash", "ash g", "residue g", "crucible ash g", "crucible + residue g", "crucible ignited g"], example: "30.011" },
    { key: "ignitionC", header: "ignition_c", label: "Ignition temperature (°C)", type: "number", required: true, aliases: ["temperature c", "temp c", "furnace c", "ignition temp c", "ignition temperature c"], example: "550" },
    { key: "ignitionHours", header: "ignition_hours", label: "Ignition time (h)", type: "number", required: true, aliases: ["hours", "time h", "duration h", "ignition h"], example: "4" },
    { key: "labId", header: "lab_id", label: "Lab id", type: "text", required: false, aliases: ["lab", "lab sample id", "lab number"] },
    notes,
  ],
};

export const BD_KIND: KindDef = {
  id: "bd",
  label: "Bulk density (core method)",
  summary: "Core diameter and height (or volume), oven-dry mass, and optional wet and coarse-fragment masses.",
  outlierVariable: "bd",
  fields: [
    sampleCode,
    { key: "diameterCm", header: "core_diameter_cm", label: "Core diameter (cm)", type: "number", required: false, aliases: ["diameter cm", "ring diameter cm", "diameter"], example: "7.62" },
    { key: "heightCm", header: "core_height_cm", label: "Core height (cm)", type: "number", required: false, aliases: ["height cm", "ring height cm", "core length cm", "height"], example: "7.62" },
    { key: "volumeCm3", header: "core_volume_cm3", label: "Core volume (cm³)", type: "number", required: false, aliases: ["volume cm3", "volume", "core volume"], example: "347.5" },
    { key: "ovenDryMassG", header: "oven_dry_mass_g", label: "Oven-dry core mass (g)", type: "number", required: true, aliases: ["dry mass g", "oven dry g", "dry g", "dry mass"], example: "452.3" },
    { key: "wetMassG", header: "wet_mass_g", label: "Field-moist mass (g)", type: "number", required: false, aliases: ["wet g", "field moist g", "moist mass g", "wet mass"], example: "561.0" },
    { key: "coarseFragmentMassG", header: "coarse_fragment_mass_g", label: "Coarse fragments > 2 mm (g)", type: "number", required: false, aliases: ["coarse g", "gravel g", "rock g", "coarse fragments g", "stones g"], example: "12.4" },
    notes,
  ],
};

/** A program-registered variable as intake needs it (from the custom_variable table). */
export interface CustomVariableDef {
  variableId: string;
  label: string;
  unit: string;
  minValue: number | null;
  maxValue: number | null;
}

export function customKind(v: CustomVariableDef): KindDef {
  return {
    id: v.variableId,
    label: `${v.label} (${v.unit})`,
    summary: `One value per sample, in ${v.unit}.`,
    outlierVariable: "value",
    fields: [
      sampleCode,
      { key: "value", header: v.variableId, label: `${v.label} (${v.unit})`, type: "number", required: true, aliases: ["value", v.label, `${v.label} ${v.unit}`], example: "" },
      notes,
    ],
  };
}

for (const kind of [LOI_KIND, BD_KIND]) {
  for (const field of kind.fields) if (field.type === "number") field.nonNegative = true;
}

export const BUILT_IN_KINDS: Record<string, KindDef> = { loi: LOI_KIND, bd: BD_KIND };

/** The fields a file must have a column for. BD needs a volume or both ring dimensions (checked per row). */
export function requiredFields(kind: KindDef): FieldDef[] {
  return kind.fields.filter((f) => f.required);
}

/** Lower case, letters and digits only, "+" kept as "plus": "Crucible + dry soil (g)" → "crucibleplusdrysoilg". */
export function normalizeHeader(header: string): string {
  return header
    .normalize("NFKD")
    .toLowerCase()
    .replace(/\+/g, "plus")
    .replace(/[^a-z0-9]+/g, "");
}

/** Headers as one string, used to remember a program's mapping for files shaped alike. */
export function headerSignature(headers: readonly string[]): string {
  return headers.map(normalizeHeader).join("|");
}

/**
 * Field key → header index, matching each template field to a file header by its template name or
 * an alias. Fields with no match are left out.
 */
export function autoMapColumns(kind: KindDef, headers: readonly string[]): Record<string, number> {
  const normalized = headers.map(normalizeHeader);
  const mapping: Record<string, number> = {};
  for (const field of kind.fields) {
    const names = [field.header, ...field.aliases].map(normalizeHeader);
    const index = normalized.findIndex((h) => names.includes(h));
    if (index >= 0 && !Object.values(mapping).includes(index)) mapping[field.key] = index;
  }
  return mapping;
}
