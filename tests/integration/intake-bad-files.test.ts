// The bad-file corpus (tests/fixtures/bad-csv/) and an oversize file made here: each is refused
// with a clear sentence, and the trial's data are as they were.
import { readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "~/.server/seed";
import { action as intakeAction } from "~/routes/trial.intake";
import { action as reviewAction, loader as reviewLoader } from "~/routes/trial.intake.review";
import { action as samplingAction } from "~/routes/trial.sampling";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";
import { trialState, uploadRequest } from "../support/intake";
import { cookieFor, formPost, outcome, requestAs } from "../support/sessions";

let trialId: string;
let cookie: string;
const args = (request: Request, params: Record<string, string>) => ({ request, params, context: {} }) as never;
const fixture = (name: string) => new Uint8Array(readFileSync(`tests/fixtures/bad-csv/${name}`));

beforeAll(async () => {
  ({ trialId } = await seedDemo());
  cookie = await cookieFor("technician@cedarhollow.example", DEMO_PASSWORD);
  const form = new URLSearchParams({ seasonLabel: "2028 spring", eventDate: "2028-04-18", depths: "0-10, 10-20, 20-30", variables: "loi" });
  const created = await outcome(() => samplingAction(args(requestAs(cookie, `/trials/${trialId}/sampling`, { method: "POST", body: form }), { trialId })));
  expect(created.status).toBe(200);
});

/** Refused before anything is stored: the upload form answers with the message beside the file field. */
const fileLevel: [string, RegExp, Record<string, string>?][] = [
  ["empty.csv", /The file is empty/],
  ["header-only.csv", /header row but no data rows/],
  ["wrong-delimiter.csv", /seems to use semicolons between columns/, { delimiter: "comma" }],
  ["binary.csv", /spreadsheet or other binary file/],
  ["latin1.csv", /not UTF-8 text/],
  ["unclosed-quote.csv", /quoted cell is never closed/],
];

/** Stored for review, refused at commit: [file, expected message, spreadsheet row, column]. */
const rowLevel: [string, RegExp, number, string | null, Record<string, string>?][] = [
  ["bom-decimal-comma.csv", /“E7-999-0-10” is not on any sample sheet/, 3, "sample_code", { decimalComma: "on" }],
  ["quoted-newlines.csv", /“E7-999-0-10” is not on any sample sheet/, 4, "sample_code"],
  ["duplicate-codes.csv", /also appears on row 4/, 2, "sample_code"],
  ["unknown-codes.csv", /“E7-777-0-10” is not on any sample sheet/, 3, "sample_code"],
  ["negative-masses.csv", /is negative \(-30\)/, 2, "crucible_dry_soil_g"],
  ["ash-heavier-than-dry.csv", /ignited residue .* is heavier than the oven-dry soil/, 2, "crucible_residue_g"],
  ["text-in-numeric.csv", /“twenty” is not a number/, 2, "crucible_g"],
  ["formula-cells.csv", /“=HYPERLINK\(.*is not a number/, 2, "crucible_g"],
  ["depth-gap.csv", /Gap between 0–10 cm and 20–30 cm/, 2, "sample_code"],
];

describe("bad files", () => {
  it.each(fileLevel)("%s is refused at upload: %s", async (name, message, fields = {}) => {
    const before = await trialState(trialId);
    const res = await outcome(() => intakeAction(args(uploadRequest(cookie, trialId, { name, bytes: fixture(name) }, fields), { trialId })));
    expect(res.status).toBe(400);
    expect((res.body as { errors: { file: string[] } }).errors.file[0]).toMatch(message);
    expect(await trialState(trialId)).toEqual(before);
  });

  it.each(rowLevel)("%s shows %s on its row and cannot be committed", async (name, message, rowNumber, column, fields = {}) => {
    const before = await trialState(trialId);
    const up = await outcome(() => intakeAction(args(uploadRequest(cookie, trialId, { name, bytes: fixture(name) }, fields), { trialId })));
    expect(up.status).toBe(302);
    const uploadId = up.location!.split("/").at(-1)!;
    const review = (await reviewLoader(args(requestAs(cookie, `/trials/${trialId}/intake/${uploadId}?show=problems`), { trialId, uploadId }))) as {
      rows: { rowNumber: number; status: string; messages: { column: string | null; message: string }[] }[];
    };
    const hit = review.rows.find((r) => r.messages.some((m) => message.test(m.message)));
    expect(hit, JSON.stringify(review.rows)).toBeDefined();
    expect(hit!.rowNumber).toBe(rowNumber);
    expect(hit!.status).toBe("error");
    expect(hit!.messages.find((m) => message.test(m.message))!.column).toBe(column);
    const commit = await outcome(() => reviewAction(args(formPost(cookie, `/trials/${trialId}/intake/${uploadId}`, { intent: "commit", confirmWarnings: "on" }), { trialId, uploadId })));
    expect(commit.status).toBe(400);
    expect((commit.body as { message: string }).message).toMatch(/nothing was committed/);
    expect(await trialState(trialId)).toEqual(before);
  });

  it("refuses a file over 20 MB with the limit in the message, storing nothing", async () => {
    const before = await trialState(trialId);
    const line = "E7-101-0-10,20.000,30.000,29.500,550,4,LAB-000001,padding padding padding\n";
    const big = new TextEncoder().encode(line.repeat(Math.ceil((21 * 1024 * 1024) / line.length)));
    const res = await outcome(() => intakeAction(args(uploadRequest(cookie, trialId, { name: "huge.csv", bytes: big }), { trialId })));
    expect(res.status).toBe(400);
    expect((res.body as { errors: { file: string[] } }).errors.file[0]).toMatch(/^The file is 2\d\.\d MB; lab intake takes files up to 20 MB/);
    expect(await trialState(trialId)).toEqual(before);
  });
});
