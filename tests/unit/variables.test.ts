import { describe, expect, it } from "vitest";
import { BUILT_IN_VARIABLE_IDS, builtInVariable, checkCustomVariableId, VARIABLES } from "../../analysis/variables";
import { UNITS } from "../../analysis/units";

describe("variable registry", () => {
  it("holds exactly the built-in ids of DESIGN.md, each under its own id", () => {
    // DESIGN.md "Words": loi, som, soc, bd, bd_fine, soc_stock, soc_stock_esm, moisture
    expect(Object.keys(VARIABLES).sort()).toEqual(
      ["loi", "som", "soc", "bd", "bd_fine", "soc_stock", "soc_stock_esm", "moisture"].sort(),
    );
    expect([...BUILT_IN_VARIABLE_IDS].sort()).toEqual(Object.keys(VARIABLES).sort());
    for (const [id, v] of Object.entries(VARIABLES)) {
      expect(v.id).toBe(id);
      expect(v.label.length).toBeGreaterThan(0);
      expect(v.description.length).toBeGreaterThan(0);
      expect(Number.isInteger(v.decimals) && v.decimals >= 0).toBe(true);
      expect(UNITS[v.unit]).toBeDefined();
    }
  });

  it("stores units as DESIGN.md states them (SI: %, g/cm³, Mg C/ha)", () => {
    expect(UNITS[VARIABLES.bd.unit].si).toBe("g/cm³");
    expect(UNITS[VARIABLES.soc_stock_esm.unit].si).toBe("Mg C/ha");
    expect(UNITS[VARIABLES.loi.unit].si).toBe("%");
    // DESIGN.md "Moisture bases": name the basis in every label
    expect(VARIABLES.moisture.label).toMatch(/dry basis/);
  });

  it("looks up built-in variables without inheriting object properties", () => {
    expect(builtInVariable("soc")?.label).toBe("Soil organic carbon");
    expect(builtInVariable("toString")).toBeUndefined();
    expect(builtInVariable("ph")).toBeUndefined();
  });
});

describe("checkCustomVariableId", () => {
  // Rule from the brief: ^[a-z][a-z0-9_]{1,39}$, and not a built-in id
  it.each(["ph", "earthworms_per_m2", "yield_2026", "a".repeat(40)])("accepts %s", (id) => {
    expect(checkCustomVariableId(id)).toEqual({ ok: true });
  });

  it.each(["p", "a".repeat(41), "Earthworms", "2ph", "_ph", "ph-value", "ph value", "pH", "", "ñu"])(
    "rejects %j",
    (id) => {
      const result = checkCustomVariableId(id);
      expect(result.ok).toBe(false);
      expect(!result.ok && result.message).toMatch(/2 to 40 characters/);
    },
  );

  it("rejects a built-in id with its own message", () => {
    const result = checkCustomVariableId("soc_stock");
    expect(result).toEqual({ ok: false, message: expect.stringMatching(/built-in variable/) });
  });
});
