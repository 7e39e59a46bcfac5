// Per-measurement derivations of lab intake against DESIGN.md's worked checks and hand calculations.
import { describe, expect, it } from "vitest";
import { deriveBd, deriveLoi } from "~/.server/intake/compute";

describe("deriveLoi", () => {
  it("reproduces DESIGN.md's LOI and SOC worked check", () => {
    // DESIGN.md: crucible 20.000 g, +dry 30.000 g, +ignited 29.500 g → LOI 5.00 %; 5.00 % SOM → 2.90 % SOC at 1.724.
    const r = deriveLoi({ crucibleG: 20, crucibleDrySoilG: 30, crucibleResidueG: 29.5 }, { socFactor: 1.724 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.values.loi).toBeCloseTo(5.0, 10);
    expect(r.values.som).toBeCloseTo(5.0, 10);
    expect(r.values.soc).toBeCloseTo(2.9, 2); // 5 / 1.724 = 2.9002
  });

  it("applies a lab calibration and the Pribyl factor", () => {
    // Hand calculation: SOM = 0.9 × 5 + 0.2 = 4.7 %; SOC = 4.7 / 2.0 = 2.35 %.
    const r = deriveLoi({ crucibleG: 20, crucibleDrySoilG: 30, crucibleResidueG: 29.5 }, { socFactor: 2, calibration: { slope: 0.9, intercept: 0.2 } });
    expect(r.ok && r.values.som).toBeCloseTo(4.7, 10);
    expect(r.ok && r.values.soc).toBeCloseTo(2.35, 10);
  });

  it("refuses ash heavier than dry soil and names the residue column", () => {
    const r = deriveLoi({ crucibleG: 20, crucibleDrySoilG: 30, crucibleResidueG: 30.5 }, { socFactor: 1.724 });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.field).toBe("crucibleResidueG");
    expect(r.error.message).toMatch(/heavier than the oven-dry soil/);
  });
});

describe("deriveBd", () => {
  it("uses the 3-inch ring volume of DESIGN.md", () => {
    // DESIGN.md: V = π·3.81²·7.62 = 347.5 cm³. Hand calculation: BD = 451.75 / 347.5 = 1.300 g/cm³.
    const r = deriveBd({ diameterCm: 7.62, heightCm: 7.62, ovenDryMassG: 451.75 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.values.volumeCm3).toBeCloseTo(347.5, 1);
    expect(r.values.bd).toBeCloseTo(1.3, 3);
    expect(r.values.bd_fine).toBeCloseTo(r.values.bd, 12); // blank coarse fragments: none found
    expect(r.values.moisture).toBeNull();
  });

  it("subtracts coarse fragments for BD_fine and gives dry-basis moisture", () => {
    // Hand calculation: V = 347.5 cm³ (stated); whole BD = 480.00 / 347.5 = 1.3813;
    // BD_fine = (480.00 − 28.25) / 347.5 = 451.75 / 347.5 = 1.3000 g/cm³;
    // moisture = (576.00 − 480.00) / 480.00 × 100 = 20.0 % (dry basis).
    const r = deriveBd({ volumeCm3: 347.5, ovenDryMassG: 480, coarseFragmentMassG: 28.25, wetMassG: 576 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.values.bd).toBeCloseTo(1.3813, 4);
    expect(r.values.bd_fine).toBeCloseTo(1.3, 10);
    expect(r.values.moisture).toBeCloseTo(20, 10);
  });

  it("flags a bulk density outside 0.5–2.0 g/cm³ as a warning", () => {
    // 250 / 347.5 = 0.719 is fine; 150 / 347.5 = 0.432 < 0.5 (DESIGN.md range).
    const r = deriveBd({ volumeCm3: 347.5, ovenDryMassG: 150 });
    expect(r.ok && r.flags[0].status).toBe("warning");
  });
});
