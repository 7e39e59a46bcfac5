// Lab methods, custom variables and a trial's carbon method: permissions, messages, and derived values.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { loadDerivedSamples } from "~/.server/intake/derived";
import { seedDemo } from "~/.server/seed";
import * as labPage from "~/routes/program.lab";
import * as trialLab from "~/routes/trial.lab-method";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";
import { cookieFor, formPost, outcome } from "../support/sessions";

let programId: string;
let trialId: string;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  ({ programId, trialId } = await seedDemo());
  for (const role of ["researcher", "technician", "collaborator"]) cookies[role] = await cookieFor(`${role}@cedarhollow.example`, DEMO_PASSWORD);
}, 120_000);

const postLab = (cookie: string, fields: Record<string, string>) =>
  outcome(() => labPage.action({ request: formPost(cookie, `/programs/${programId}/lab`, fields), params: { programId }, context: {} } as never));
const postTrial = (cookie: string, fields: Record<string, string>) =>
  outcome(() => trialLab.action({ request: formPost(cookie, `/trials/${trialId}/lab-method`, fields), params: { trialId }, context: {} } as never));

const method = { intent: "method", name: "LOI 550 °C, 4 h, calibrated", ignitionC: "550", ignitionHours: "4", somSlope: "1.1", somIntercept: "0.2", notes: "" };

describe("lab methods and variables", () => {
  it("lets a technician add a method and refuses a collaborator", async () => {
    expect((await postLab(cookies.collaborator, method)).status).toBe(403);
    expect((await postLab(cookies.technician, method)).body).toMatchObject({ ok: expect.stringContaining("added") });
    const again = await postLab(cookies.technician, method);
    expect(again.body).toMatchObject({ errors: { name: ["This program already has a lab method with that name."] } });
  });

  it("puts messages beside bad fields and stores nothing", async () => {
    const bad = await postLab(cookies.technician, { ...method, name: "Other", somSlope: "abc", ignitionC: "5000" });
    expect(bad.body).toMatchObject({ errors: { somSlope: ["The slope must be a number."], ignitionC: ["Ignition temperature must be between 300 and 1000."] } });
    const badVariable = await postLab(cookies.technician, { intent: "variable", variableId: "Earth Worms", label: "Earthworms", unit: "worms/m²", decimals: "0", minValue: "10", maxValue: "5", description: "" });
    expect(badVariable.status).toBe(400);
    const errors = (badVariable.body as { errors: Record<string, string[]> }).errors;
    expect(errors.variableId?.[0]).toBeTruthy();
    expect(errors.maxValue).toEqual(["The highest value must be above the lowest."]);
    expect(await db.select().from(schema.customVariables)).toHaveLength(0);
  });
});

describe("a trial's carbon method", () => {
  it("is refused to technicians", async () => {
    expect((await postTrial(cookies.technician, { socFactor: "2.0", labMethodId: "" })).status).toBe(403);
  });

  it("changes derived SOM and SOC and moves the data version", async () => {
    const [before] = await db.select({ v: schema.trials.dataVersion }).from(schema.trials).where(eq(schema.trials.id, trialId));
    const [labMethod] = await db.select().from(schema.labMethods);
    const saved = await postTrial(cookies.researcher, { socFactor: "2.0", labMethodId: labMethod.id });
    expect(saved.body).toMatchObject({ ok: expect.stringContaining("Saved") });
    const [after] = await db.select({ v: schema.trials.dataVersion }).from(schema.trials).where(eq(schema.trials.id, trialId));
    expect(after.v).toBe(before.v + 1);
    const sample = (await loadDerivedSamples(trialId, { measuredOnly: true })).find((s) => s.loi !== null)!;
    expect(sample.som).toBeCloseTo(1.1 * sample.loi! + 0.2, 10); // the calibration entered above
    expect(sample.soc).toBeCloseTo(sample.som! / 2.0, 10); // Pribyl 2010 factor 2.0
  });

  it("refuses a forged factor or another program's method", async () => {
    expect((await postTrial(cookies.researcher, { socFactor: "1.5", labMethodId: "" })).body).toMatchObject({
      errors: { socFactor: ["Choose 1.724 or 2.0."] },
    });
    const foreign = await postTrial(cookies.researcher, { socFactor: "1.724", labMethodId: "00000000-0000-4000-8000-000000000000" });
    expect(foreign.body).toMatchObject({ errors: { labMethodId: ["Choose one of this program's lab methods."] } });
  });
});
