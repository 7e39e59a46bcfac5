// Field briefs: who may publish and read, frozen numbers, public links, notifications.
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { trialResults } from "~/.server/results/service";
import { seedDemo } from "~/.server/seed";
import * as briefRoute from "~/routes/brief";
import * as briefCsv from "~/routes/brief-csv";
import * as trialBriefs from "~/routes/trial.briefs";
import type { BriefContent } from "~/.server/briefs";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";
import { cookieFor, formPost, outcome, requestAs } from "../support/sessions";

let trialId: string;
let programId: string;
const cookies: Record<string, string> = {};
const selection = "variables=som&depth=0-10&method=tukey&alpha=0.05";

beforeAll(async () => {
  ({ trialId, programId } = await seedDemo());
  for (const role of ["researcher", "technician", "collaborator", "extension"]) {
    cookies[role] = await cookieFor(`${role}@cedarhollow.example`, DEMO_PASSWORD);
  }
}, 120_000);

const publish = (cookie: string, fields: Record<string, string> = {}) =>
  outcome(() =>
    trialBriefs.action({
      request: formPost(cookie, `/trials/${trialId}/briefs`, {
        briefId: "new",
        title: "Compost and soil organic matter at Cedar Hollow",
        summary: "Compost raised soil organic matter in the top 10 cm compared with the untreated check.",
        context: "Degraded silt loam.",
        authors: "T. Reyes",
        isPublic: "no",
        selection,
        ...fields,
      }),
      params: { trialId },
      context: {},
    } as never),
  );

const readBrief = (cookie: string | null, briefId: string, version?: string) =>
  outcome(() =>
    briefRoute.loader({ request: requestAs(cookie, `/briefs/${briefId}`), params: { briefId, version }, context: {} } as never),
  );

describe("publishing", () => {
  it("is refused to technicians and collaborators", async () => {
    expect((await publish(cookies.technician)).status).toBe(403);
    expect((await publish(cookies.collaborator)).status).toBe(403);
    expect(await db.select().from(schema.briefs)).toHaveLength(0);
  });

  it("puts messages beside the fields for a bad title or empty authors and publishes nothing", async () => {
    const bad = await publish(cookies.researcher, { title: "x", authors: "" });
    expect(bad.status).toBe(400);
    expect(bad.body).toMatchObject({ errors: { title: ["Give the brief a title of at least 5 characters."], authors: ["Name the authors."] } });
    expect(await db.select().from(schema.briefs)).toHaveLength(0);
  });

  it("stores the table the analysis library gives at publication, and keeps it after new data", async () => {
    const published = await publish(cookies.researcher);
    expect(published.status).toBe(302);
    const [version] = await db.select().from(schema.briefVersions);
    const content = version.content as unknown as BriefContent;
    const live = await trialResults(trialId, { variable: "som", depth: "0-10", model: "per_season", method: "tukey", alpha: 0.05 });
    const t2 = content.sections[0].rows.find((r) => r.code === "T2")!;
    const t2Live = live.results.means.find((m) => m.code === "T2")!;
    expect(t2.mean).toBe(t2Live.mean);
    expect(t2.vsCheck!.diff).toBe(t2Live.vsCheck!.diff);
    expect(t2.group).toBe(t2Live.group);

    // New data arrive: the LOI residues of every T2 core's top increment are corrected, and the
    // trial's data version moves on.
    const t2Loi = await db
      .select({ id: schema.measurements.id, inputs: schema.measurements.inputs })
      .from(schema.measurements)
      .innerJoin(schema.samples, eq(schema.samples.id, schema.measurements.sampleId))
      .innerJoin(schema.plots, eq(schema.plots.id, schema.samples.plotId))
      .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
      .where(and(eq(schema.measurements.kind, "loi"), eq(schema.treatments.code, "T2"), eq(schema.samples.topCm, 0)));
    expect(t2Loi.length).toBeGreaterThan(0);
    for (const m of t2Loi) {
      await db
        .update(schema.measurements)
        .set({ inputs: { ...m.inputs, crucibleResidueG: Number(m.inputs.crucibleResidueG) - 0.2 } })
        .where(eq(schema.measurements.id, m.id));
    }
    await db.update(schema.trials).set({ dataVersion: 1000 }).where(eq(schema.trials.id, trialId));
    const liveAfter = await trialResults(trialId, { variable: "som", depth: "0-10", model: "per_season", method: "tukey", alpha: 0.05 });
    expect(liveAfter.results.means.find((m) => m.code === "T2")!.mean).not.toBeCloseTo(t2.mean, 3);

    const read = await readBrief(cookies.extension, version.briefId);
    expect(read.status).toBe(200);
    const shown = (read.body as { version: { content: BriefContent } }).version.content.sections[0].rows.find((r) => r.code === "T2")!;
    expect(shown.mean).toBe(t2.mean);
  });

  it("e-mails the program's extension agents", async () => {
    for (let i = 0; i < 50; i++) {
      const mail = await db.select().from(schema.mailboxMessages).where(eq(schema.mailboxMessages.envelopeTo, "extension@cedarhollow.example"));
      if (mail.length > 0) {
        expect(mail[0].subject).toBe("New field brief: Compost and soil organic matter at Cedar Hollow");
        return;
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error("no notification arrived");
  });
});

describe("reading", () => {
  it("lets extension agents read the brief and its CSV but not results", async () => {
    const [brief] = await db.select().from(schema.briefs);
    const csv = await outcome(() =>
      briefCsv.loader({ request: requestAs(cookies.extension, `/briefs/${brief.id}/summary.csv`), params: { briefId: brief.id }, context: {} } as never),
    );
    expect(csv.status).toBe(200);
    expect(String(csv.body)).toContain("treatment_code");
    const results = await import("~/routes/api.trial-results");
    const refused = await outcome(() =>
      results.loader({ request: requestAs(cookies.extension, `/api/trials/${trialId}/results`), params: { trialId }, context: {} } as never),
    );
    expect(refused.status).toBe(403);
  });

  it("sends signed-out readers of a private brief to sign-in, and opens a public one", async () => {
    const [brief] = await db.select().from(schema.briefs);
    expect((await readBrief(null, brief.id)).status).toBe(302);
    await db.update(schema.briefs).set({ isPublic: true }).where(eq(schema.briefs.id, brief.id));
    expect((await readBrief(null, brief.id)).status).toBe(200);
  });

  it("refuses members of other programs a private brief", async () => {
    const [brief] = await db.select().from(schema.briefs);
    await db.update(schema.briefs).set({ isPublic: false }).where(eq(schema.briefs.id, brief.id));
    const { randomUUID } = await import("node:crypto");
    const { hashPassword } = await import("better-auth/crypto");
    const other = randomUUID();
    const user = randomUUID();
    await db.insert(schema.programs).values({ id: other, name: "Elsewhere", slug: "elsewhere" });
    await db.insert(schema.users).values({ id: user, name: "Ext Elsewhere", email: "ext@elsewhere.example" });
    await db.insert(schema.accounts).values({ id: randomUUID(), accountId: user, providerId: "credential", userId: user, password: await hashPassword("elsewhere-password") });
    await db.insert(schema.members).values({ id: randomUUID(), organizationId: other, userId: user, role: "extension" });
    const cookie = await cookieFor("ext@elsewhere.example", "elsewhere-password");
    expect((await readBrief(cookie, brief.id)).status).toBe(403);
  });

  it("publishes a second version without changing the first", async () => {
    const [brief] = await db.select().from(schema.briefs);
    const again = await publish(cookies.researcher, { briefId: brief.id, title: "Compost and soil organic matter, update" });
    expect(again).toMatchObject({ status: 302, location: `/briefs/${brief.id}/v/2` });
    const versions = await db.select().from(schema.briefVersions).where(and(eq(schema.briefVersions.briefId, brief.id)));
    expect(versions.map((v) => v.version).sort()).toEqual([1, 2]);
    const first = await readBrief(cookies.extension, brief.id, "1");
    expect((first.body as { version: { title: string } }).version.title).toBe("Compost and soil organic matter at Cedar Hollow");
    expect(programId).toBeTruthy();
  });
});
