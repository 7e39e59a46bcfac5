// Lab intake end to end against PostgreSQL: events and sample codes, templates, upload, review,
// commit with notice, duplicates, column mapping, corrections, QC, audit log, roles, derived values.
import { randomUUID } from "node:crypto";
import { and, eq, like, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { loadDerivedSamples } from "~/.server/intake/derived";
import { saveEntries } from "~/.server/intake/entry";
import { commitUpload, receiveUpload } from "~/.server/intake/uploads";
import { seedDemo } from "~/.server/seed";
import { loader as templateLoader } from "~/routes/api.trial-template";
import { loader as auditCsvLoader } from "~/routes/api.trial-audit";
import { action as intakeAction } from "~/routes/trial.intake";
import { action as reviewAction, loader as reviewLoader } from "~/routes/trial.intake.review";
import { action as samplingAction } from "~/routes/trial.sampling";
import { action as sampleAction } from "~/routes/trial.data.sample";
import { DEMO_PASSWORD, demoUsers } from "../../datasets/demo/scenario";
import { trialState, uploadRequest } from "../support/intake";
import { cookieFor, formPost, outcome, requestAs } from "../support/sessions";

let programId: string;
let trialId: string;
let userIds: Record<string, string>;
const cookies: Record<string, string> = {};
let eventId: string;

const LOI_HEADER = "sample_code,crucible_g,crucible_dry_soil_g,crucible_residue_g,ignition_c,ignition_hours,lab_id,notes";
const args = (request: Request, params: Record<string, string>) => ({ request, params, context: {} }) as never;

beforeAll(async () => {
  ({ programId, trialId, userIds } = await seedDemo());
  for (const u of demoUsers) cookies[u.role] = await cookieFor(u.email, DEMO_PASSWORD);
  const created = await outcome(() =>
    samplingAction(args(formPost(cookies.technician, `/trials/${trialId}/sampling`, { seasonLabel: "2028 spring", eventDate: "2028-04-18", depths: "0-10, 10-20, 20-30" }), { trialId })),
  );
  // The form posts the variables as repeated checkboxes; without them the action asks for one.
  expect(created.status).toBe(400);
  const form = new URLSearchParams({ seasonLabel: "2028 spring", eventDate: "2028-04-18", depths: "0-10, 10-20, 20-30" });
  form.append("variables", "loi");
  form.append("variables", "bd");
  const ok = await outcome(() => samplingAction(args(requestAs(cookies.technician, `/trials/${trialId}/sampling`, { method: "POST", body: form }), { trialId })));
  expect(ok.status).toBe(200);
  eventId = (ok.body as { eventId: string }).eventId;
});

describe("demo data through lab intake", () => {
  it("has six events, 12 committed files and one plot missing in 2026 fall", async () => {
    // datasets/demo/measurements.ts: 24 plots × 3 depths × 6 events = 432 samples, minus 3 for the missing plot-season.
    const uploads = await db.select().from(schema.uploads).where(and(eq(schema.uploads.trialId, trialId), eq(schema.uploads.status, "committed")));
    expect(uploads).toHaveLength(12);
    const derived = await loadDerivedSamples(trialId, { measuredOnly: true });
    expect(derived).toHaveLength(429);
    expect(derived.filter((d) => d.season === "2026 fall")).toHaveLength(69);
    const baseline = derived.filter((d) => d.isBaseline);
    expect(baseline).toHaveLength(72);
    expect(derived.every((d) => d.som !== null && d.bd_fine !== null && d.soc_stock_cumulative !== null)).toBe(true);
  });

  it("shows a compost effect on topsoil SOM by fall 2027 and the outlier was confirmed as a warning", async () => {
    const derived = await loadDerivedSamples(trialId);
    const mean = (t: string) => {
      const v = derived.filter((d) => d.season === "2027 fall" && d.topCm === 0 && d.treatmentCode === t).map((d) => d.som!);
      return v.reduce((a, b) => a + b, 0) / v.length;
    };
    expect(mean("T2") - mean("T1")).toBeGreaterThan(0.5);
    const [commit] = await db.select().from(schema.auditLog).where(and(eq(schema.auditLog.action, "commit"), sql`${schema.auditLog.details}->>'filename' like 'e3-loi%'`));
    expect((commit.details as { warningsConfirmed: number }).warningsConfirmed).toBeGreaterThanOrEqual(1);
  });
});

describe("roles", () => {
  it("lets a technician upload and refuses collaborator, extension and another program's owner with 403", async () => {
    const file = { name: "roles.csv", bytes: `${LOI_HEADER}\nE7-101-0-10,20,30,29.5,550,4,,\n` };
    const tech = await outcome(() => intakeAction(args(uploadRequest(cookies.technician, trialId, file), { trialId })));
    expect(tech.status).toBe(302);
    for (const role of ["collaborator", "extension"]) {
      const r = await outcome(() => intakeAction(args(uploadRequest(cookies[role], trialId, file), { trialId })));
      expect(r.status).toBe(403);
    }
    const { hashPassword } = await import("better-auth/crypto");
    const other = randomUUID();
    const outsider = randomUUID();
    await db.insert(schema.programs).values({ id: other, name: "Other Station", slug: "other-station" });
    await db.insert(schema.users).values({ id: outsider, name: "Outsider", email: "outsider@other.example" });
    await db.insert(schema.accounts).values({ id: randomUUID(), accountId: outsider, providerId: "credential", userId: outsider, password: await hashPassword("outsider-password") });
    await db.insert(schema.members).values({ id: randomUUID(), organizationId: other, userId: outsider, role: "owner" });
    const outsiderCookie = await cookieFor("outsider@other.example", "outsider-password");
    const r = await outcome(() => intakeAction(args(uploadRequest(outsiderCookie, trialId, file), { trialId })));
    expect(r.status).toBe(403);
    const uploadId = tech.location!.split("/").at(-1)!;
    const review = await outcome(() => reviewLoader(args(requestAs(cookies.collaborator, `/trials/${trialId}/intake/${uploadId}`), { trialId, uploadId })));
    expect(review.status).toBe(403);
    // Discard it so the main journey starts clean.
    await reviewAction(args(formPost(cookies.technician, `/trials/${trialId}/intake/${uploadId}`, { intent: "discard" }), { trialId, uploadId }));
  });
});

describe("template → upload → review → commit", () => {
  let template: string;
  it("offers a template with the event's 72 sample codes", async () => {
    const res = (await templateLoader(args(requestAs(cookies.technician, `/api/trials/${trialId}/template.csv?event=${eventId}&kind=loi`), { trialId }))) as Response;
    template = (await res.text()).replace(/^\uFEFF/, "");
    const lines = template.trim().split("\r\n");
    expect(lines[0]).toBe(LOI_HEADER);
    expect(lines).toHaveLength(73);
    expect(lines[1]).toBe("E7-101-0-10,,,,,,,");
  });

  it("shows a bad row with row, column and fix, then commits the fixed file and tells the researchers", async () => {
    const before = await trialState(trialId);
    // Every sample of E7 gets the DESIGN.md weighings (LOI 5.00 %); row 3 has ash heavier than dry soil.
    const lines = template.trim().split("\r\n").slice(1).map((l) => l.replace(/,,,,,,,$/, ",20.000,30.000,29.500,550,4,,"));
    const bad = [LOI_HEADER, ...lines.map((l, i) => (i === 1 ? l.replace("29.500", "30.500") : l))].join("\n");
    const up = await outcome(() => intakeAction(args(uploadRequest(cookies.technician, trialId, { name: "e7-loi.csv", bytes: bad }), { trialId })));
    expect(up.status).toBe(302);
    const uploadId = up.location!.split("/").at(-1)!;
    const review = await outcome(() => reviewLoader(args(requestAs(cookies.technician, `/trials/${trialId}/intake/${uploadId}?show=problems`), { trialId, uploadId })));
    const body = review.body as { counts: { ok: number; error: number }; rows: { rowNumber: number; messages: { column: string; message: string }[] }[] };
    expect(body.counts).toEqual({ ok: 71, warning: 0, error: 1 });
    expect(body.rows).toHaveLength(1);
    expect(body.rows[0].rowNumber).toBe(3);
    expect(body.rows[0].messages[0]).toMatchObject({ column: "crucible_residue_g" });
    const refused = await outcome(() => reviewAction(args(formPost(cookies.technician, `/trials/${trialId}/intake/${uploadId}`, { intent: "commit" }), { trialId, uploadId })));
    expect(refused.status).toBe(400);
    expect(await trialState(trialId)).toEqual(before);

    const good = [LOI_HEADER, ...lines].join("\n");
    const up2 = await outcome(() => intakeAction(args(uploadRequest(cookies.technician, trialId, { name: "e7-loi-fixed.csv", bytes: good }), { trialId })));
    const fixedId = up2.location!.split("/").at(-1)!;
    const committed = await outcome(() => reviewAction(args(formPost(cookies.technician, `/trials/${trialId}/intake/${fixedId}`, { intent: "commit" }), { trialId, uploadId: fixedId })));
    expect(committed.status).toBe(302);
    expect(committed.location).toBe(`/trials/${trialId}/data?event=${eventId}&committed=${fixedId}&notice=mailed`);
    const after = await trialState(trialId);
    expect(after.measurements).toBe(before.measurements + 72);
    expect(after.dataVersion).toBe(before.dataVersion + 1);
    const [stored] = await db.select().from(schema.uploads).where(eq(schema.uploads.id, fixedId));
    expect(Buffer.from(stored.content).toString("utf8")).toBe(good); // byte for byte
    expect(stored.sha256).toBe((await import("node:crypto")).createHash("sha256").update(good).digest("hex"));
    const mail = await db.select().from(schema.mailboxMessages).where(like(schema.mailboxMessages.envelopeTo, "%researcher@cedarhollow.example%"));
    expect(mail.some((m) => m.subject?.includes("Lab results committed"))).toBe(true);

    // The same bytes again: recognized and refused politely, nothing stored.
    const again = await outcome(() => intakeAction(args(uploadRequest(cookies.technician, trialId, { name: "copy.csv", bytes: good }), { trialId })));
    expect(again.status).toBe(400);
    expect(JSON.stringify(again.body)).toMatch(/already committed as “e7-loi-fixed.csv”/);
    expect(await trialState(trialId)).toEqual(after);
  });

  it("derives LOI, SOM, SOC per sample (DESIGN.md worked check) in loadDerivedSamples", async () => {
    const rows = await loadDerivedSamples(trialId, { eventId });
    const s = rows.find((r) => r.sampleCode === "E7-101-0-10")!;
    expect(s.loi).toBeCloseTo(5.0, 10); // DESIGN.md: 20.000 / 30.000 / 29.500 g → LOI 5.00 %
    expect(s.som).toBeCloseTo(5.0, 10);
    expect(s.soc).toBeCloseTo(2.9, 2); // DESIGN.md: 5.00 % SOM → 2.90 % SOC at 1.724
    expect(s.bd).toBeNull(); // no BD yet
    expect(s.soc_stock).toBeNull();
    expect(s).toMatchObject({ season: "2028 spring", plotNumber: 101, topCm: 0, bottomCm: 10, excluded: false });
  });

  it("remembers a column mapping for files with the same headings", async () => {
    const header = "Bag,Tare (g),Dry+crucible,Residue+crucible,Furnace,Hours";
    const file1 = `${header}\nE7-101-0-10,20,30,29.5,550,4\n`;
    const up = await outcome(() => intakeAction(args(uploadRequest(cookies.technician, trialId, { name: "lab-a.csv", bytes: file1 }, { kind: "bd" }), { trialId })));
    const uploadId = up.location!.split("/").at(-1)!;
    const first = (await reviewLoader(args(requestAs(cookies.technician, `/trials/${trialId}/intake/${uploadId}`), { trialId, uploadId }))) as { missing: { key: string }[] };
    expect(first.missing.map((m) => m.key)).toEqual(["ovenDryMassG", "diameterCm", "heightCm", "volumeCm3"]);
    const mapped = await outcome(() =>
      reviewAction(args(formPost(cookies.technician, `/trials/${trialId}/intake/${uploadId}`, { intent: "map", "field:sampleCode": "0", "field:volumeCm3": "1", "field:ovenDryMassG": "2" }), { trialId, uploadId })),
    );
    expect(mapped.status).toBe(200);
    await reviewAction(args(formPost(cookies.technician, `/trials/${trialId}/intake/${uploadId}`, { intent: "discard" }), { trialId, uploadId }));
    const up2 = await outcome(() => intakeAction(args(uploadRequest(cookies.technician, trialId, { name: "lab-b.csv", bytes: `${header}\nE7-102-0-10,347.5,451.75,0,550,4\n` }, { kind: "bd" }), { trialId })));
    const second = (await reviewLoader(args(requestAs(cookies.technician, up2.location!), { trialId, uploadId: up2.location!.split("/").at(-1)! }))) as { missing: unknown[]; options: { mappingRemembered: boolean }; rows: { derived: Record<string, number | null> }[] };
    expect(second.missing).toEqual([]);
    expect(second.options.mappingRemembered).toBe(true);
    expect(second.rows[0].derived.bd).toBeCloseTo(1.3, 3); // 451.75 g / 347.5 cm³ = 1.300 g/cm³ (hand calculation)
  });
});

describe("stocks from derived values", () => {
  it("reproduces 2 % × 1.3 g/cm³ × 30 cm = 78 Mg C/ha cumulatively (DESIGN.md)", async () => {
    // Plot 103 of E7: LOI 3.448 % → SOC 3.448 / 1.724 = 2.000 %; BD 451.75 g / 347.5 cm³ = 1.300 g/cm³ in each
    // 10 cm increment → 26 Mg C/ha per increment, cumulative 26, 52, 78; fine-earth mass 1300, 2600, 3900 Mg/ha.
    const codes = ["E7-103-0-10", "E7-103-10-20", "E7-103-20-30"];
    const loi = saveEntries(trialId, programId, userIds.technician, "loi", codes.map((sampleCode) => ({ sampleCode, cells: { crucibleG: "20", crucibleDrySoilG: "30", crucibleResidueG: "29.6552", ignitionC: "550", ignitionHours: "4" }, reason: "LOI re-run for the stock check" })), { confirmWarnings: true });
    // Every other E7 sample has LOI 5.00 %, so these stand out and are confirmed as warnings.
    expect((await loi).ok).toBe(true);
    const bd = await saveEntries(trialId, programId, userIds.technician, "bd", codes.map((sampleCode) => ({ sampleCode, cells: { volumeCm3: "347.5", ovenDryMassG: "451.75" } })));
    expect(bd.ok).toBe(true);
    const rows = (await loadDerivedSamples(trialId, { eventId })).filter((r) => codes.includes(r.sampleCode));
    expect(rows.map((r) => r.soc_stock!)).toEqual([expect.closeTo(26, 3), expect.closeTo(26, 3), expect.closeTo(26, 3)]);
    expect(rows.map((r) => r.soc_stock_cumulative!)).toEqual([expect.closeTo(26, 3), expect.closeTo(52, 3), expect.closeTo(78, 3)]);
    expect(rows.map((r) => r.fine_earth_mass_cumulative!)).toEqual([expect.closeTo(1300, 6), expect.closeTo(2600, 6), expect.closeTo(3900, 6)]);
  });
});

describe("corrections and QC", () => {
  it("needs a reason to correct, keeps the history and logs before and after", async () => {
    const cells = { crucibleG: "20", crucibleDrySoilG: "30", crucibleResidueG: "29.6", ignitionC: "550", ignitionHours: "4" };
    const noReason = await saveEntries(trialId, programId, userIds.technician, "loi", [{ sampleCode: "E7-104-0-10", cells }]);
    expect(noReason.ok).toBe(false);
    if (!noReason.ok) expect(Object.values(noReason.reasonErrors)[0]).toMatch(/needs a reason/);
    const viaPage = await outcome(() =>
      sampleAction(args(formPost(cookies.technician, `/trials/${trialId}/data/sample?code=E7-104-0-10`, { intent: "entry", kind: "loi", "f:crucibleG": "20", "f:crucibleDrySoilG": "30", "f:crucibleResidueG": "29.6", "f:ignitionC": "550", "f:ignitionHours": "4", reason: "residue re-weighed", confirmWarnings: "on" }), { trialId })),
    );
    expect(viaPage.status).toBe(200);
    const s = (await loadDerivedSamples(trialId, { eventId })).find((r) => r.sampleCode === "E7-104-0-10")!;
    expect(s.loi).toBeCloseTo(4.0, 10); // (10 − 9.6) / 10 × 100 = 4.00 % (hand calculation)
    const history = await db.select().from(schema.measurements).where(eq(schema.measurements.sampleId, s.sampleId));
    expect(history).toHaveLength(2);
    const [entry] = await db.select().from(schema.auditLog).where(and(eq(schema.auditLog.action, "correct"), sql`${schema.auditLog.details}->>'sampleCode' = 'E7-104-0-10'`));
    expect(entry.details).toMatchObject({ reason: "residue re-weighed", before: { crucibleResidueG: 29.5 }, after: { crucibleResidueG: 29.6 } });
  });

  it("lets a researcher exclude with a reason; the value stays visible but drops out; technicians cannot", async () => {
    const s = (await loadDerivedSamples(trialId, { eventId })).find((r) => r.sampleCode === "E7-105-0-10")!;
    const measurementId = s.measurements[0].measurementId;
    const fields = { intent: "qc", measurementId, decision: "exclude", reason: "crucible cracked in the furnace" };
    const tech = await outcome(() => sampleAction(args(formPost(cookies.technician, `/trials/${trialId}/data/sample?code=E7-105-0-10`, fields), { trialId })));
    expect(tech.status).toBe(403);
    const res = await outcome(() => sampleAction(args(formPost(cookies.researcher, `/trials/${trialId}/data/sample?code=E7-105-0-10`, fields), { trialId })));
    expect(res.status).toBe(200);
    const after = (await loadDerivedSamples(trialId, { eventId })).find((r) => r.sampleCode === "E7-105-0-10")!;
    expect(after.excluded).toBe(true);
    expect(after.loi).toBeNull();
    expect(after.measurements[0].asMeasured!.loi).toBeCloseTo(5, 10);
    expect(after.measurements[0]).toMatchObject({ status: "excluded", statusReason: "crucible cracked in the furnace" });
  });

  it("exports the audit log as CSV, filtered", async () => {
    const res = (await auditCsvLoader(args(requestAs(cookies.collaborator, `/api/trials/${trialId}/audit.csv?action=exclude`), { trialId }))) as Response;
    const text = await res.text();
    expect(text).toMatch(/excluded in QC/);
    expect(text).toMatch(/crucible cracked in the furnace/);
    expect(text).not.toMatch(/file committed/);
  });
});

describe("interrupted commit", () => {
  it("leaves no partial rows when the connection dies midway", async () => {
    const rows = ["E7-201", "E7-202", "E7-203", "E7-204", "E7-205", "E7-206"].flatMap((p) => ["0-10", "10-20", "20-30"].map((d) => `${p}-${d},347.5,451.75`));
    const csv = ["sample_code,core_volume_cm3,oven_dry_mass_g", ...rows].join("\n");
    const { uploadId } = await receiveUpload({ trialId, programId, actorId: userIds.technician, kind: "bd", filename: "cut.csv", contentType: "text/csv", bytes: new TextEncoder().encode(csv), decimalComma: false });
    const before = await trialState(trialId);
    await expect(
      commitUpload(trialId, programId, userIds.technician, uploadId, {
        confirmWarnings: true,
        chunkSize: 5,
        afterChunk: async (tx, written) => {
          if (written < 10) return;
          // Kill this transaction's own backend from a second connection, as a crash or network cut would.
          const result = await tx.execute<{ pid: number }>("select pg_backend_pid() as pid");
          await db.execute(`select pg_terminate_backend(${Number(result.rows[0].pid)})`);
        },
      }),
    ).rejects.toThrow();
    expect(await trialState(trialId)).toEqual(before);
    const [upload] = await db.select().from(schema.uploads).where(eq(schema.uploads.id, uploadId));
    expect(upload.status).toBe("received");
    // The same upload commits cleanly afterwards.
    const done = await commitUpload(trialId, programId, userIds.technician, uploadId, { confirmWarnings: true });
    expect(done.rows).toBe(18);
  });
});
