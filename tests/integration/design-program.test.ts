// Program-level design pages: sites, amendments and batches with their temperature logs, the blend
// calculator, factorial and split-plot treatments, and power planning.
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { seedDemo } from "~/.server/seed";
import * as amendmentPage from "~/routes/program.amendment";
import * as amendmentsPage from "~/routes/program.amendments";
import * as batchPage from "~/routes/program.batch";
import * as blendPage from "~/routes/program.blend";
import * as sitesPage from "~/routes/program.sites";
import * as planningPage from "~/routes/trial.planning";
import * as randomization from "~/routes/trial.randomization";
import * as newTrial from "~/routes/trial-new";
import * as treatmentsPage from "~/routes/trial.treatments";
import { DEMO_PASSWORD, demoUsers } from "../../datasets/demo/scenario";
import { cookieFor, formPost, outcome, requestAs } from "../support/sessions";

type Args = { request: Request; params: Record<string, string>; context: unknown };
const run = (fn: unknown, request: Request, params: Record<string, string>) =>
  outcome(() => (fn as (a: Args) => Promise<unknown>)({ request, params, context: {} }));
type Refusal = { errors: Record<string, string[]>; values: Record<string, string>; message?: string };

let programId: string;
let demoTrialId: string;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  ({ programId, trialId: demoTrialId } = await seedDemo());
  for (const u of demoUsers) cookies[u.role] = await cookieFor(u.email, DEMO_PASSWORD);
});

describe("sites", () => {
  const site = { name: "South Terrace", latitude: "40.07", longitude: "-88.2", soilSeries: "", textureClass: "silt loam", sandPct: "20", siltPct: "60", clayPct: "15", notes: "" };

  it("refuses particle sizes that do not add up to 100 %, beside the clay field", async () => {
    const result = await run(sitesPage.action, formPost(cookies.researcher, `/programs/${programId}/sites`, site), { programId });
    expect(result.status).toBe(400);
    expect((result.body as Refusal).errors.clayPct).toEqual(["Sand, silt and clay must add up to 100 % (they add up to 95 %)."]);
    expect((result.body as Refusal).values.name).toBe("South Terrace");
  });

  it("refuses half a coordinate and an unknown texture class", async () => {
    const half = await run(sitesPage.action, formPost(cookies.researcher, `/programs/${programId}/sites`, { ...site, clayPct: "20", longitude: "" }), { programId });
    expect((half.body as Refusal).errors.longitude).toEqual(["Give both latitude and longitude, or neither."]);
    const texture = await run(sitesPage.action, formPost(cookies.researcher, `/programs/${programId}/sites`, { ...site, clayPct: "20", textureClass: "loamy clay" }), { programId });
    expect((texture.body as Refusal).errors.textureClass).toEqual(["Choose one of the USDA texture classes."]);
  });

  it("saves a valid site for a researcher, not for a technician", async () => {
    const valid = { ...site, clayPct: "20" };
    expect((await run(sitesPage.action, formPost(cookies.technician, `/programs/${programId}/sites`, valid), { programId })).status).toBe(403);
    const result = await run(sitesPage.action, formPost(cookies.researcher, `/programs/${programId}/sites`, valid), { programId });
    expect(result.status).toBe(302);
    const [row] = await db.select().from(schema.sites).where(eq(schema.sites.name, "South Terrace"));
    expect(row).toMatchObject({ sandPct: 20, siltPct: 60, clayPct: 20, textureClass: "silt loam", longitude: -88.2 });
  });
});

describe("amendments, batches and the temperature log", () => {
  let amendmentId: string;
  let batchId: string;

  it("lets a technician record an amendment and a batch; a collaborator gets 403", async () => {
    const amendment = { name: "Poultry litter compost", material: "compost", source: "", description: "" };
    expect((await run(amendmentsPage.action, formPost(cookies.collaborator, `/programs/${programId}/amendments`, amendment), { programId })).status).toBe(403);
    const created = await run(amendmentsPage.action, formPost(cookies.technician, `/programs/${programId}/amendments`, amendment), { programId });
    expect(created.status).toBe(302);
    amendmentId = created.location!.split("/").at(-1)!;

    const batch = { label: "PLC-2026-A", receivedOn: "2026-04-01", moistureWetBasisPct: "100", totalCarbonDryPct: "30", totalNitrogenDryPct: "2.5", ph: "", ecDsPerM: "", compostingMethod: "static_pile", notes: "" };
    const bad = await run(amendmentPage.action, formPost(cookies.technician, `/programs/${programId}/amendments/${amendmentId}`, batch), { programId, amendmentId });
    expect((bad.body as Refusal).errors.moistureWetBasisPct).toEqual(["Moisture must be at most 99.9 %."]);
    const ok = await run(amendmentPage.action, formPost(cookies.technician, `/programs/${programId}/amendments/${amendmentId}`, { ...batch, moistureWetBasisPct: "40" }), { programId, amendmentId });
    expect(ok.status).toBe(302);
    batchId = ok.location!.split("/").at(-1)!;
  });

  const batchUrl = () => `/programs/${programId}/amendments/${amendmentId}/batches/${batchId}`;
  const params = () => ({ programId, amendmentId, batchId });

  it("derives C:N from the stored C and N", async () => {
    const page = await run(batchPage.loader, requestAs(cookies.collaborator, batchUrl()), params());
    // 30 % C / 2.5 % N = 12 (hand calculation).
    expect((page.body as { batch: { cnRatio: number } }).batch.cnRatio).toBe(12);
  });

  it("refuses a log with a bad line and stores none of it", async () => {
    const csv = "read_at,probe_c,turned\n2026-05-01 08:00,56,no\n2026-05-01 18:00,warm,no\n";
    const result = await run(batchPage.action, formPost(cookies.technician, batchUrl(), { intent: "import", csv }), params());
    expect(result.status).toBe(400);
    expect((result.body as Refusal).errors.csv[0]).toBe("Nothing was added. 1 problem: Line 3: the probe reading “warm” is not a number of °C.");
    expect(await db.select().from(schema.batchTemperatureReadings).where(eq(schema.batchTemperatureReadings.batchId, batchId))).toHaveLength(0);
  });

  it("imports a static-pile log that meets the rule, then fails it by one cool reading", async () => {
    // Three consecutive days with every reading ≥ 55 °C: the static rule of 21 CFR 112.54 / 40 CFR 503 App. B.
    const csv = [
      "read_at,probe_c,turned",
      "2026-05-01 08:00,56,no",
      "2026-05-01 18:00,58.5,no",
      "2026-05-02 08:00,57,no",
      "2026-05-02 18:00,59,no",
      "2026-05-03 08:00,55,no",
      "2026-05-03 18:00,56,no",
    ].join("\n");
    const result = await run(batchPage.action, formPost(cookies.technician, batchUrl(), { intent: "import", csv }), params());
    expect(result.body).toEqual({ ok: "6 readings added from the pasted log." });
    let page = await run(batchPage.loader, requestAs(cookies.researcher, batchUrl()), params());
    let check = (page.body as { check: { passed: boolean; longestConsecutiveRun: string[]; caution: string } }).check;
    expect(check.passed).toBe(true);
    expect(check.longestConsecutiveRun).toEqual(["2026-05-01", "2026-05-02", "2026-05-03"]);
    expect(check.caution).toMatch(/not regulatory compliance/);

    const cool = await run(batchPage.action, formPost(cookies.technician, batchUrl(), { intent: "add-reading", readAt: "2026-05-02 12:00", probeC: "54.5" }), params());
    expect(cool.body).toEqual({ ok: "Reading added." });
    page = await run(batchPage.loader, requestAs(cookies.researcher, batchUrl()), params());
    check = (page.body as typeof page.body & { check: typeof check }).check;
    expect(check.passed).toBe(false);
  });

  it("keeps a mistyped reading beside its field", async () => {
    const result = await run(batchPage.action, formPost(cookies.technician, batchUrl(), { intent: "add-reading", readAt: "yesterday", probeC: "130" }), params());
    const body = result.body as Refusal;
    expect(body.errors.readAt).toEqual(["Enter the date and time as 2025-06-01 08:30."]);
    expect(body.errors.probeC).toEqual(["The probe reading must be at most 95 °C."]);
    expect(body.values.readAt).toBe("yesterday");
  });

  it("records batch changes in the audit log", async () => {
    const rows = await db.select().from(schema.auditLog).where(and(eq(schema.auditLog.programId, programId), eq(schema.auditLog.entity, "temperature_reading")));
    expect(rows.map((r) => r.details)).toEqual([{ count: 6, source: "pasted" }, { count: 1, source: "form" }]);
  });
});

describe("correcting and removing an amendment", () => {
  const url = (id: string) => `/programs/${programId}/amendments/${id}`;
  const details = { intent: "update", name: "Leaf mould, 2 yr", material: "leaf_mould", source: "Municipal depot", description: "" };

  it("corrects the details with the old and new values in the audit log, and refuses a name in use", async () => {
    const created = await run(amendmentsPage.action, formPost(cookies.technician, `/programs/${programId}/amendments`, { name: "Leaf mold", material: "compost", source: "", description: "" }), { programId });
    const id = created.location!.split("/").at(-1)!;
    expect((await run(amendmentPage.action, formPost(cookies.collaborator, url(id), details), { programId, amendmentId: id })).status).toBe(403);
    const saved = await run(amendmentPage.action, formPost(cookies.technician, url(id), details), { programId, amendmentId: id });
    expect(saved.body).toEqual({ ok: "Details saved." });
    const [row] = await db.select().from(schema.amendments).where(eq(schema.amendments.id, id));
    expect(row).toMatchObject({ name: "Leaf mould, 2 yr", material: "leaf_mould", source: "Municipal depot" });
    const [audit] = await db.select().from(schema.auditLog).where(and(eq(schema.auditLog.entityId, id), eq(schema.auditLog.action, "update")));
    expect(audit.details).toEqual({ name: { from: "Leaf mold", to: "Leaf mould, 2 yr" }, material: { from: "compost", to: "leaf_mould" }, source: { from: null, to: "Municipal depot" } });

    const clash = await run(amendmentPage.action, formPost(cookies.technician, url(id), { ...details, name: "Poultry litter compost" }), { programId, amendmentId: id });
    expect(clash.status).toBe(400);
    expect((clash.body as Refusal).errors.name).toEqual(["This program already has an amendment called “Poultry litter compost”."]);
  });

  it("removes an amendment without batches, and keeps one with batches", async () => {
    const kept = await db.select().from(schema.amendments).where(and(eq(schema.amendments.programId, programId), eq(schema.amendments.name, "Poultry litter compost")));
    const refused = await run(amendmentPage.action, formPost(cookies.technician, url(kept[0].id), { intent: "delete" }), { programId, amendmentId: kept[0].id });
    expect(refused.status).toBe(400);
    expect((refused.body as Refusal).message).toMatch(/^“Poultry litter compost” has 1 batch on record, so it stays/);

    const spare = await run(amendmentsPage.action, formPost(cookies.researcher, `/programs/${programId}/amendments`, { name: "Typo amendment", material: "other", source: "", description: "" }), { programId });
    const id = spare.location!.split("/").at(-1)!;
    const removed = await run(amendmentPage.action, formPost(cookies.researcher, url(id), { intent: "delete" }), { programId, amendmentId: id });
    expect(removed).toMatchObject({ status: 302, location: `/programs/${programId}/amendments` });
    expect(await db.select().from(schema.amendments).where(eq(schema.amendments.id, id))).toEqual([]);
    const [audit] = await db.select().from(schema.auditLog).where(and(eq(schema.auditLog.entityId, id), eq(schema.auditLog.action, "delete")));
    expect(audit.details).toEqual({ name: "Typo amendment", material: "other" });
  });
});

describe("blend calculator", () => {
  it("weights C and N by dry mass", async () => {
    const batches = await db.select().from(schema.amendmentBatches);
    const lm = batches.find((b) => b.label === "LM-2025-A")!;
    const scg = batches.find((b) => b.label === "SCG-2025-A")!;
    const url = `/programs/${programId}/blend-calculator?batch0=${lm.id}&mass0=10&batch1=${scg.id}&mass1=5`;
    const page = await run(blendPage.loader, requestAs(cookies.collaborator, url), { programId });
    // Hand calculation with the demo batches: C = 10·38 + 5·47 = 615; N = 10·1.1 + 5·2.2 = 22; 615 / 22 = 27.954…
    expect((page.body as { blend: number }).blend).toBeCloseTo(27.9545, 4);
  });

  it("says which row is incomplete", async () => {
    const page = await run(blendPage.loader, requestAs(cookies.collaborator, `/programs/${programId}/blend-calculator?batch0=&mass0=3`), { programId });
    expect((page.body as { errors: Record<string, string[]>; blend: null }).errors.batch0).toEqual(["Choose a batch for this dry mass."]);
  });
});

describe("factorial and split-plot trials", () => {
  async function createTrial(design: string) {
    const result = await run(
      newTrial.action,
      formPost(cookies.researcher, `/programs/${programId}/trials/new`, {
        title: `A ${design} trial`,
        design,
        plotLengthM: "5",
        plotWidthM: "2",
        alleyBetweenPlotsM: "0.5",
        alleyBetweenBlocksM: "1",
        blockCount: "3",
      }),
      { programId },
    );
    return result.location!.split("/")[2];
  }
  const post = (trialId: string, fields: Record<string, string>) => run(treatmentsPage.action, formPost(cookies.researcher, `/trials/${trialId}/treatments`, fields), { trialId });

  it("generates amendment × rate combinations and lays them out in blocks", async () => {
    const trialId = await createTrial("factorial_rcbd");
    expect((await post(trialId, { intent: "add-factor", factorName: "amendment", levels: "compost, manure" })).status).toBe(302);
    const oneLevel = await post(trialId, { intent: "add-factor", factorName: "rate", levels: "10" });
    expect((oneLevel.body as Refusal).errors.levels).toEqual(["A factor needs at least two levels, separated by commas."]);
    expect((await post(trialId, { intent: "add-factor", factorName: "rate", levels: "10, 20, 40" })).status).toBe(302);
    expect((await post(trialId, { intent: "generate" })).status).toBe(302);
    const treatments = await db.select().from(schema.treatments).where(eq(schema.treatments.trialId, trialId));
    expect(treatments.map((t) => t.code).sort()).toEqual(["compost × 10", "compost × 20", "compost × 40", "manure × 10", "manure × 20", "manure × 40"]);
    expect(treatments.find((t) => t.code === "manure × 20")?.factorLevels).toEqual({ amendment: "manure", rate: "20" });

    const drawn = await run(randomization.action, formPost(cookies.researcher, `/trials/${trialId}/randomization`, { intent: "randomize", blockCount: "3", arrangement: "serpentine", blockOrientation: "columns", seed: "99" }), { trialId });
    expect(drawn.body).toEqual({ ok: "Randomized with seed 99: 18 plots drawn." });
  });

  it("puts every main-plot level once per block and every sub-plot level once per main plot", async () => {
    const trialId = await createTrial("split_plot");
    await post(trialId, { intent: "add-factor", factorName: "tillage", levels: "none, shallow", stratum: "main" });
    const sameStratum = await post(trialId, { intent: "add-factor", factorName: "other", levels: "a, b", stratum: "main" });
    expect((sameStratum.body as Refusal).errors.stratum).toEqual(["The main-plot factor is already defined."]);
    await post(trialId, { intent: "add-factor", factorName: "compost", levels: "0, 10, 20", stratum: "sub" });
    await post(trialId, { intent: "generate" });
    await run(randomization.action, formPost(cookies.researcher, `/trials/${trialId}/randomization`, { intent: "randomize", blockCount: "3", arrangement: "straight", blockOrientation: "rows", seed: "5" }), { trialId });
    const plots = await db
      .select({ block: schema.blocks.number, main: schema.plots.mainPlotNumber, levels: schema.treatments.factorLevels })
      .from(schema.plots)
      .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
      .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
      .where(eq(schema.plots.trialId, trialId));
    expect(plots).toHaveLength(18);
    for (const block of [1, 2, 3]) {
      const inBlock = plots.filter((p) => p.block === block);
      for (const main of [1, 2]) {
        const sub = inBlock.filter((p) => p.main === main);
        expect(new Set(sub.map((p) => p.levels!.tillage)).size).toBe(1);
        expect(sub.map((p) => p.levels!.compost).sort()).toEqual(["0", "10", "20"]);
      }
      expect(new Set(inBlock.map((p) => p.levels!.tillage))).toEqual(new Set(["none", "shallow"]));
    }
  });
});

describe("power planning", () => {
  it("gives the MDD for 3–8 blocks and the blocks needed, matching a hand computation", async () => {
    const url = `/trials/${demoTrialId}/planning?cv=10&mean=3&difference=0.5&alpha=0.05&power=0.8`;
    const page = await run(planningPage.loader, requestAs(cookies.researcher, url), { trialId: demoTrialId });
    const plan = (page.body as { plan: { mse: number; table: { blocks: number; df: number; mdd: number }[]; needed: number } }).plan;
    // MSE = (10/100 · 3)² = 0.09. The demo trial has t = 6 treatments.
    expect(plan.mse).toBeCloseTo(0.09, 12);
    // r = 4: df = 5·3 = 15; t0.975,15 = 2.131 and t0.80,15 = 0.866 (t table);
    // MDD = (2.131 + 0.866)·√(2·0.09/4) = 2.997 · 0.212132 = 0.6358.
    const r4 = plan.table.find((r) => r.blocks === 4)!;
    expect(r4.df).toBe(15);
    expect(r4.mdd).toBeCloseTo(0.6358, 3);
    // r = 6: df = 25; (2.060 + 0.856)·√(0.03) = 2.916 · 0.173205 = 0.5051 > 0.5;
    // r = 7: df = 30; (2.042 + 0.854)·√(0.18/7) = 2.896 · 0.160357 = 0.4644 ≤ 0.5 → 7 blocks.
    expect(plan.table.find((r) => r.blocks === 6)!.mdd).toBeCloseTo(0.5051, 3);
    expect(plan.needed).toBe(7);
  });

  it("asks for the mean when a CV is given without it, and is refused to a technician", async () => {
    const page = await run(planningPage.loader, requestAs(cookies.researcher, `/trials/${demoTrialId}/planning?cv=10&difference=0.5`), { trialId: demoTrialId });
    expect((page.body as { errors: Record<string, string[]> }).errors.mean).toEqual(["A CV needs the expected mean to turn it into an MSE."]);
    const technician = await run(planningPage.loader, requestAs(cookies.technician, `/trials/${demoTrialId}/planning`), { trialId: demoTrialId });
    expect(technician.status).toBe(403);
  });
});
