import type { SiUnit } from "./units";

/** A measured or derived soil variable: the registry is the one place its id, label and unit are defined. */
export interface VariableDefinition {
  id: string;
  label: string;
  /** Stored (SI) unit; analysis/units.ts knows its label and US customary form. */
  unit: SiUnit;
  /** Decimal places to show. */
  decimals: number;
  description: string;
  /** True when Tilthmark derives it from raw inputs; such values are never typed in. */
  derived: boolean;
}

export const BUILT_IN_VARIABLE_IDS = [
  "loi",
  "som",
  "soc",
  "bd",
  "bd_fine",
  "soc_stock",
  "soc_stock_esm",
  "moisture",
] as const;

export type BuiltInVariableId = (typeof BUILT_IN_VARIABLE_IDS)[number];

export const VARIABLES: Record<BuiltInVariableId, VariableDefinition> = {
  loi: {
    id: "loi",
    label: "Loss on ignition",
    unit: "percent",
    decimals: 2,
    description: "Mass lost on ignition as a percentage of oven-dry soil mass.",
    derived: true,
  },
  som: {
    id: "som",
    label: "Soil organic matter",
    unit: "percent",
    decimals: 2,
    description: "Soil organic matter, % of oven-dry soil: equal to LOI or from the lab's LOI calibration.",
    derived: true,
  },
  soc: {
    id: "soc",
    label: "Soil organic carbon",
    unit: "percent",
    decimals: 2,
    description: "Soil organic carbon, % of oven-dry soil: SOM divided by 1.724 (or 2.0), or by dry combustion.",
    derived: true,
  },
  bd: {
    id: "bd",
    label: "Bulk density (whole core)",
    unit: "g_per_cm3",
    decimals: 2,
    description: "Oven-dry mass of the whole core divided by the core volume.",
    derived: true,
  },
  bd_fine: {
    id: "bd_fine",
    label: "Bulk density (fine earth)",
    unit: "g_per_cm3",
    decimals: 2,
    description: "Oven-dry mass of the core minus coarse fragments (> 2 mm), divided by the core volume.",
    derived: true,
  },
  soc_stock: {
    id: "soc_stock",
    label: "SOC stock (fixed depth)",
    unit: "mg_c_per_ha",
    decimals: 1,
    description: "Soil organic carbon per hectare in a depth increment: SOC % × fine-earth bulk density × thickness.",
    derived: true,
  },
  soc_stock_esm: {
    id: "soc_stock_esm",
    label: "SOC stock (equivalent soil mass)",
    unit: "mg_c_per_ha",
    decimals: 1,
    description:
      "Soil organic carbon per hectare in a fixed reference mass of fine earth, so bulk-density changes do not bias comparisons.",
    derived: true,
  },
  moisture: {
    id: "moisture",
    label: "Gravimetric moisture (dry basis)",
    unit: "percent",
    decimals: 1,
    description: "Water mass as a percentage of oven-dry soil mass (dry basis).",
    derived: true,
  },
};

/** A built-in variable's definition, or undefined for an id that is not built in. */
export function builtInVariable(id: string): VariableDefinition | undefined {
  return Object.hasOwn(VARIABLES, id) ? VARIABLES[id as BuiltInVariableId] : undefined;
}

const CUSTOM_VARIABLE_ID = /^[a-z][a-z0-9_]{1,39}$/;

export type VariableIdCheck = { ok: true } | { ok: false; message: string };

/**
 * Checks an id for a custom variable: 2–40 characters, lower-case letters, digits and underscores,
 * starting with a letter (`^[a-z][a-z0-9_]{1,39}$`), and not one of the built-in ids.
 */
export function checkCustomVariableId(id: string): VariableIdCheck {
  if (typeof id !== "string" || !CUSTOM_VARIABLE_ID.test(id)) {
    return {
      ok: false,
      message:
        "A variable id is 2 to 40 characters: lower-case letters, digits and underscores, starting with a letter " +
        "(for example earthworms_per_m2).",
    };
  }
  if (builtInVariable(id)) {
    return { ok: false, message: `"${id}" is a built-in variable; choose another id.` };
  }
  return { ok: true };
}
