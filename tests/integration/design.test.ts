// Trial design end to end through the route modules: create, treatments, randomize, lock, the
// refusals after locking, role checks, the plot map JSON and SVG, and the application sheet.
import Papa from "papaparse";
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { rcbdLayout } from "../../analysis/design";
import { db, schema } from "~/.server/db";
import { seedDemo } from "~/.server/seed";
import * as layoutApi from "~/routes/api.trial-layout";
import * as sheetCsv from "~/routes/download.application-sheet-csv";
import * as mapSvg from "~/routes/download.plot-map-svg";
import * as randomization from "~/routes/trial.randomization";
import * as setup from "~/routes/trial.setup";
import * as newTrial from "~/routes/trial-new";
import * as treatmentsPage from "~/routes/trial.treatments";
import { DEMO_PASSWORD, demoUsers } from "../../datasets/demo/scenario";
import { cookieFor, formPost, outcome, requestAs } from "../support/sessions";

type Args = { request: Request; params: Record<string, string>; context: unknown };
// Route handlers take React Router's typed args; these tests pass the same shape by hand.
const run = (fn: unknown, request: Request, params: Record<string, string>) =>
  outcome(() => (fn as (a: Args) => Promise<unknown>)({ request, params, context: {} }));

let programId: string;
const cookies: Record<string, string> = {};
let trialId: string;
let demoTrialId: string;
let ywcBatchId: string;

beforeAll(async () => {
  ({ programId, trialId: demoTrialId } = await seedDemo());
  for (const u of demoUsers) cookies[u.role] = await cookieFor(u.email, DEMO_PASSWORD);
  const [batch] = await db.select().from(schema.amendmentBatches).where(eq(schema.amendmentBatches.label, "YWC-2025-A"));
  ywcBatchId = batch.id;
});

const trialForm = {
  title: "Compost rates on the lower terrace",
  objective: "Does compost raise SOM?",
  hypotheses: "",
  siteId: "",
  design: "rcbd",
  plotLengthM: "6",
  plotWidthM: "3",
  alleyBetweenPlotsM: "1",
  alleyBetweenBlocksM: "2",
  blockCount: "4",
};

async function auditActions(id: string) {
  const rows = await db.select().from(schema.auditLog).where(eq(schema.auditLog.trialId, id));
  return rows.map((r) => `${r.action}:${r.entity}`);
}

describe("creating a trial", () => {
  it("shows errors beside the fields, keeps what was typed, and writes nothing", async () => {
    const before = await db.select().from(schema.trials);
    const bad = await run(newTrial.action, formPost(cookies.researcher, `/programs/${programId}/trials/new`, { ...trialForm, title: " ", plotLengthM: "six" }), { programId });
    expect(bad.status).toBe(400);
    const body = bad.body as { errors: Record<string, string[]>; values: Record<string, string> };
    expect(body.errors.title).toEqual(["Enter a title."]);
    expect(body.errors.plotLengthM).toEqual(["Plot length must be a number."]);
    expect(body.values.objective).toBe("Does compost raise SOM?");
    expect(await db.select().from(schema.trials)).toHaveLength(before.length);
  });

  it.each(["technician", "collaborator", "extension"])("refuses a %s with 403", async (role) => {
    const result = await run(newTrial.action, formPost(cookies[role], `/programs/${programId}/trials/new`, trialForm), { programId });
    expect(result.status).toBe(403);
  });

  it("lets a researcher create a draft and sends them to its treatments", async () => {
    const result = await run(newTrial.action, formPost(cookies.researcher, `/programs/${programId}/trials/new`, trialForm), { programId });
    expect(result.status).toBe(302);
    trialId = result.location!.split("/")[2];
    expect(result.location).toBe(`/trials/${trialId}/treatments`);
    const [trial] = await db.select().from(schema.trials).where(eq(schema.trials.id, trialId));
    expect(trial).toMatchObject({ status: "draft", design: "rcbd", plotLengthM: 6, plotWidthM: 3, blockCount: 4 });
  });
});

describe("treatments", () => {
  const path = () => `/trials/${trialId}/treatments`;
  const post = (role: string, fields: Record<string, string>) => run(treatmentsPage.action, formPost(cookies[role], path(), fields), { trialId });

  it("adds five treatments, the first an untreated check", async () => {
    for (const [code, name] of [["T1", "Untreated check"], ["T2", "Compost 10"], ["T3", "Compost 20"], ["T4", "Manure 15"], ["T5", "Leaf mould 10"]]) {
      const result = await post("researcher", { intent: "add-treatment", code, name, description: "", ...(code === "T1" ? { isCheck: "on" } : {}) });
      expect(result.status).toBe(302);
    }
    const rows = await db.select().from(schema.treatments).where(eq(schema.treatments.trialId, trialId));
    expect(rows.map((t) => t.code).sort()).toEqual(["T1", "T2", "T3", "T4", "T5"]);
    expect(rows.find((t) => t.code === "T1")?.isCheck).toBe(true);
  });

  it("refuses a duplicate code beside the code field", async () => {
    const result = await post("researcher", { intent: "add-treatment", code: "T2", name: "Again" });
    expect(result.status).toBe(400);
    expect((result.body as { errors: Record<string, string[]> }).errors.code).toEqual(["Another treatment already has the code “T2”."]);
  });

  it("refuses a second untreated check beside the tick box, adding and editing alike", async () => {
    const message = ["T1 (Untreated check) is already this trial's untreated check; differences and contrasts compare against one. Untick this, or make T1 an ordinary treatment first."];
    const added = await post("researcher", { intent: "add-treatment", code: "T9", name: "Second check", isCheck: "on" });
    expect(added.status).toBe(400);
    expect((added.body as { errors: Record<string, string[]> }).errors.isCheck).toEqual(message);
    const [t2] = await db.select().from(schema.treatments).where(and(eq(schema.treatments.trialId, trialId), eq(schema.treatments.code, "T2")));
    const edited = await post("researcher", { intent: "update-treatment", treatmentId: t2.id, code: "T2", name: "Compost 10", description: "", isCheck: "on" });
    expect(edited.status).toBe(400);
    expect((edited.body as { errors: Record<string, string[]> }).errors.isCheck).toEqual(message);
    const checks = await db.select().from(schema.treatments).where(and(eq(schema.treatments.trialId, trialId), eq(schema.treatments.isCheck, true)));
    expect(checks.map((t) => t.code)).toEqual(["T1"]);
  });

  it("adds a compost application to T2 and refuses one on the check", async () => {
    const [t1, t2] = await Promise.all(
      ["T1", "T2"].map(async (code) => (await db.select().from(schema.treatments).where(and(eq(schema.treatments.trialId, trialId), eq(schema.treatments.code, code))))[0]),
    );
    const application = { intent: "add-application", batchId: ywcBatchId, rateMgDmPerHa: "10", layerDepthCm: "", timing: "each_season", everyNWeeks: "", notes: "" };
    expect((await post("researcher", { ...application, treatmentId: t2.id })).status).toBe(302);
    const onCheck = await post("researcher", { ...application, treatmentId: t1.id });
    expect(onCheck.status).toBe(400);
    expect((onCheck.body as { errors: Record<string, string[]> }).errors.batchId).toEqual(["The untreated check receives no amendment."]);
    const neither = await post("researcher", { ...application, treatmentId: t2.id, rateMgDmPerHa: "" });
    expect(neither.status).toBe(400);
  });

  it("refuses a technician's treatment change with 403", async () => {
    expect((await post("technician", { intent: "add-treatment", code: "T9", name: "x" })).status).toBe(403);
  });
});

describe("randomizing and locking", () => {
  const path = () => `/trials/${trialId}/randomization`;
  const post = (role: string, fields: Record<string, string>) => run(randomization.action, formPost(cookies[role], path(), fields), { trialId });
  const randomize = { intent: "randomize", blockCount: "4", arrangement: "straight", blockOrientation: "rows", seed: "12345" };

  it.each(["technician", "collaborator"])("refuses a %s randomizing or locking with 403", async (role) => {
    expect((await post(role, randomize)).status).toBe(403);
    expect((await post(role, { intent: "lock" })).status).toBe(403);
  });

  it("refuses to lock before there is a layout", async () => {
    const result = await post("researcher", { intent: "lock" });
    expect(result.status).toBe(400);
    expect((result.body as { message: string }).message).toBe("Randomize the layout before locking it.");
  });

  it("stores the seed and the library's layout: every treatment once per block", async () => {
    const result = await post("researcher", randomize);
    expect(result.body).toEqual({ ok: "Randomized with seed 12345: 20 plots drawn." });
    const plots = await db
      .select({ plotNumber: schema.plots.plotNumber, block: schema.blocks.number, code: schema.treatments.code })
      .from(schema.plots)
      .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
      .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
      .where(eq(schema.plots.trialId, trialId));
    for (const b of [1, 2, 3, 4]) expect(plots.filter((p) => p.block === b).map((p) => p.code).sort()).toEqual(["T1", "T2", "T3", "T4", "T5"]);
    const expected = rcbdLayout({ treatments: ["T1", "T2", "T3", "T4", "T5"], blocks: 4, seed: 12345 });
    expect(plots.sort((a, b) => a.plotNumber - b.plotNumber).map((p) => [p.plotNumber, p.code])).toEqual(expected.plots.map((p) => [p.plotNumber, p.treatment]));
  });

  it("re-randomizes with a fresh seed while in draft, and shows a bad seed beside its field", async () => {
    const bad = await post("researcher", { ...randomize, seed: "-3" });
    expect(bad.status).toBe(400);
    expect((bad.body as { errors: Record<string, string[]> }).errors.seed).toEqual(["The seed must be at least 0."]);
    const again = await post("researcher", { ...randomize, seed: "" });
    expect(again.status).toBe(200);
    const [trial] = await db.select().from(schema.trials).where(eq(schema.trials.id, trialId));
    expect((again.body as { ok: string }).ok).toBe(`Randomized with seed ${trial.randomizationSeed}: 20 plots drawn.`);
    expect((await post("researcher", randomize)).status).toBe(200);
  });

  it("unlocks a locked design before any sampling, for a researcher who gives a reason", async () => {
    expect(await post("researcher", { intent: "lock" })).toMatchObject({ status: 200 });
    expect((await post("technician", { intent: "unlock", reason: "Wrong plot size" })).status).toBe(403);
    const noReason = await post("researcher", { intent: "unlock", reason: "  " });
    expect(noReason.status).toBe(400);
    expect((noReason.body as { errors: Record<string, string[]> }).errors.reason).toBeDefined();
    const unlocked = await post("researcher", { intent: "unlock", reason: "Plot width was entered in feet" });
    expect(unlocked.body).toEqual({ ok: "Design unlocked. Correct it, randomize again if needed, and lock it before sampling." });
    const [trial] = await db.select().from(schema.trials).where(eq(schema.trials.id, trialId));
    expect(trial).toMatchObject({ status: "draft", lockedAt: null, randomizationSeed: 12345 });
    const [entry] = await db.select().from(schema.auditLog).where(and(eq(schema.auditLog.trialId, trialId), eq(schema.auditLog.action, "unlock")));
    expect(entry.details).toEqual({ reason: "Plot width was entered in feet", seed: 12345 });
  });

  it("keeps a design locked once it has been sampled", async () => {
    const refused = await run(randomization.action, formPost(cookies.researcher, `/trials/${demoTrialId}/randomization`, { intent: "unlock", reason: "Try" }), { trialId: demoTrialId });
    expect(refused.status).toBe(400);
    expect((refused.body as { message: string }).message).toMatch(/^Samples have been planned or taken on these plots \(\d+ sampling events\), so the layout stays fixed/);
  });

  it("lets a researcher lock, then refuses every design change with a clear message", async () => {
    expect(await post("researcher", { intent: "lock" })).toMatchObject({ status: 200 });
    const [trial] = await db.select().from(schema.trials).where(eq(schema.trials.id, trialId));
    expect(trial.status).toBe("locked");
    const plotsBefore = await db.select().from(schema.plots).where(eq(schema.plots.trialId, trialId));

    const again = await post("researcher", randomize);
    expect(again.status).toBe(400);
    expect((again.body as { message: string }).message).toMatch(/^The design of this trial was locked on \d{4}-\d{2}-\d{2}: plots, treatments/);
    const addTreatment = await run(treatmentsPage.action, formPost(cookies.researcher, `/trials/${trialId}/treatments`, { intent: "add-treatment", code: "T6", name: "Late" }), { trialId });
    expect(addTreatment.status).toBe(400);
    const resize = await run(setup.action, formPost(cookies.researcher, `/trials/${trialId}/setup`, { intent: "save", ...trialForm, plotLengthM: "8" }), { trialId });
    expect(resize.status).toBe(400);
    expect((resize.body as { errors: Record<string, string[]> }).errors.plotLengthM?.[0]).toMatch(/^The design of this trial was locked/);
    expect(await db.select().from(schema.plots).where(eq(schema.plots.trialId, trialId))).toEqual(plotsBefore);

    // Words may still change, and the status moves on.
    const describe = await run(setup.action, formPost(cookies.researcher, `/trials/${trialId}/setup`, { intent: "describe", title: "Compost rates, lower terrace", objective: "", hypotheses: "" }), { trialId });
    expect(describe.body).toEqual({ ok: "Trial saved." });
    const backwards = await run(setup.action, formPost(cookies.researcher, `/trials/${trialId}/setup`, { intent: "status", status: "draft" }), { trialId });
    expect(backwards.status).toBe(400);
    const running = await run(setup.action, formPost(cookies.researcher, `/trials/${trialId}/setup`, { intent: "status", status: "running" }), { trialId });
    expect(running.body).toEqual({ ok: "Status is now running." });
    const underWay = await post("researcher", { intent: "unlock", reason: "Too late" });
    expect((underWay.body as { message: string }).message).toBe("Only a locked trial that is not yet running can be unlocked; this one is under way, so its design stays fixed.");
  });

  it("recorded every change in the audit log", async () => {
    const actions = await auditActions(trialId);
    for (const a of ["create:trial", "add:treatment", "add:application", "randomize:layout", "lock:layout", "update:trial", "change-status:trial"]) {
      expect(actions).toContain(a);
    }
    expect(actions.filter((a) => a === "randomize:layout")).toHaveLength(3);
  });
});

describe("plot map and application sheet", () => {
  it("serves the layout JSON to a collaborator and refuses an extension agent", async () => {
    const ok = await run(layoutApi.loader, requestAs(cookies.collaborator, `/api/trials/${trialId}/layout`), { trialId });
    expect(ok.status).toBe(200);
    const data = ok.body as { plots: { plotNumber: number; fieldRow: number; fieldColumn: number }[]; trial: { seed: number; status: string } };
    expect(data.plots).toHaveLength(20);
    expect(data.trial).toMatchObject({ seed: 12345, status: "running" });
    expect(data.plots.find((p) => p.plotNumber === 305)).toMatchObject({ fieldRow: 2, fieldColumn: 4 });
    const no = await run(layoutApi.loader, requestAs(cookies.extension, `/api/trials/${trialId}/layout`), { trialId });
    expect(no).toMatchObject({ status: 403 });
    const signedOut = await run(layoutApi.loader, requestAs(null, `/api/trials/${trialId}/layout`), { trialId });
    expect(signedOut.status).toBe(401);
  });

  it("downloads the plot map as SVG with every plot labelled", async () => {
    const result = await (mapSvg.loader as (a: Args) => Promise<Response>)({ request: requestAs(cookies.researcher, `/trials/${trialId}/plot-map.svg`), params: { trialId }, context: {} });
    expect(result.headers.get("content-type")).toBe("image/svg+xml; charset=utf-8");
    const svg = await result.text();
    expect(svg.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg')).toBe(true);
    for (const n of [101, 105, 201, 405]) expect(svg).toContain(`>${n}</text>`);
    expect(svg).toContain(">N</text>");
    // Hand calculation: 5 plots × 3 m + 4 alleys × 1 m = 19 m; 4 blocks × 6 m + 3 alleys × 2 m = 30 m.
    expect(svg).toContain(">19.0 m</text>");
    expect(svg).toContain(">30.0 m</text>");
  });

  it("downloads the application sheet CSV with 29.03 kg as-is per plot for T2", async () => {
    const response = await (sheetCsv.loader as (a: Args) => Promise<Response>)({ request: requestAs(cookies.technician, `/trials/${trialId}/application-sheet.csv`), params: { trialId }, context: {} });
    expect(response.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    const text = await response.text();
    const rows = Papa.parse<string[]>(text.replace(/^\uFEFF/, ""), { skipEmptyLines: true }).data;
    expect(rows[0].slice(0, 9)).toEqual(["Plot", "Block", "Treatment code", "Treatment", "Amendment", "Batch", "Timing", "Rate (Mg/ha dry matter)", "As-is per plot (kg)"]);
    const t2 = rows.filter((r) => r[2] === "T2");
    expect(t2).toHaveLength(4);
    // DESIGN.md worked check: 10 Mg DM/ha on 18 m² at 38 % moisture = 29.03 kg as-is.
    expect(t2.every((r) => r[8] === "29.03")).toBe(true);
    // 10 Mg/ha × 1000 × 24.5 % C = 2450 kg C/ha; × 1.6 % N = 160 kg N/ha (batch YWC-2025-A of the demo).
    expect(t2[0].slice(12, 14)).toEqual(["2450", "160"]);
    expect(rows.filter((r) => r[2] === "T1").every((r) => r[4] === "none (untreated check)")).toBe(true);
    expect(text).not.toMatch(/"29\.03"/);
  });

  it("gives the sheet in US customary units on request", async () => {
    const response = await (sheetCsv.loader as (a: Args) => Promise<Response>)({ request: requestAs(cookies.researcher, `/trials/${trialId}/application-sheet.csv?units=us`), params: { trialId }, context: {} });
    const rows = Papa.parse<string[]>((await response.text()).replace(/^\uFEFF/, ""), { skipEmptyLines: true }).data;
    expect(rows[0][8]).toBe("As-is per plot (lb)");
    // 18 kg DM / 0.62 = 29.0323 kg as-is; / 0.45359237 kg/lb (NIST SP 811 pound) = 64.005 → 64.01 lb.
    expect(rows.find((r) => r[2] === "T2")![8]).toBe("64.01");
  });
});
