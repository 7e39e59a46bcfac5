// Lab intake of files: receive (bytes kept exactly, with SHA-256), review, map columns, commit
// all rows or none, discard.
import { createHash } from "node:crypto";
import { and, desc, eq, sql } from "drizzle-orm";
import { recordAudit } from "../audit";
import { db, schema, type Tx } from "../db";
import { intakeContext, kindOf } from "./context";
import { IntakeError } from "./errors";
import { autoMapColumns, headerSignature, type KindDef } from "./kinds";
import { FileProblem, parseCsvBytes, tooLargeMessage, MAX_UPLOAD_BYTES, type Delimiter, type ParsedTable } from "./parse";
import { missingFields, validateTable, type ColumnMapping, type Review } from "./validate";

export interface StoredParseOptions {
  delimiter: Delimiter;
  decimalComma: boolean;
  hadBom: boolean;
  headers: string[];
  /** Field key → column index; null until every required field has a column. */
  mapping: ColumnMapping;
  /** True when the mapping came from one the program saved for files with these headers. */
  mappingRemembered?: boolean;
}

export interface ReceiveInput {
  trialId: string;
  programId: string;
  actorId: string;
  kind: string;
  filename: string;
  contentType: string | null;
  bytes: Uint8Array;
  delimiter?: Delimiter;
  decimalComma: boolean;
}

export const sha256Hex = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

function parseOrRefuse(bytes: Uint8Array, delimiter: Delimiter | undefined, decimalComma: boolean): ParsedTable {
  try {
    return parseCsvBytes(bytes, { delimiter, decimalComma });
  } catch (error) {
    if (error instanceof FileProblem) throw new IntakeError(error.message, "file");
    throw error;
  }
}

/**
 * Stores an uploaded file as received (status "received") after checking that it reads as a CSV
 * table. A file whose bytes the trial already committed is refused; one already waiting for review
 * is returned as it is. Nothing is stored when the file cannot be read.
 */
export async function receiveUpload(input: ReceiveInput): Promise<{ uploadId: string; existing: boolean }> {
  if (input.bytes.length > MAX_UPLOAD_BYTES) throw new IntakeError(tooLargeMessage(input.bytes.length), "file", 413);
  const { kind } = await kindOf(input.programId, input.kind);
  const sha256 = sha256Hex(input.bytes);
  const [same] = await db
    .select({ id: schema.uploads.id, status: schema.uploads.status, filename: schema.uploads.filename, committedAt: schema.uploads.committedAt, by: schema.users.name })
    .from(schema.uploads)
    .innerJoin(schema.users, eq(schema.users.id, schema.uploads.uploadedBy))
    .where(and(eq(schema.uploads.trialId, input.trialId), eq(schema.uploads.sha256, sha256), sql`${schema.uploads.status} <> 'discarded'`))
    .orderBy(desc(schema.uploads.uploadedAt))
    .limit(1);
  if (same?.status === "committed") {
    throw new IntakeError(
      `This exact file was already committed as “${same.filename}” on ${same.committedAt?.toISOString().slice(0, 10)} by ${same.by}, so nothing was stored again. If the lab re-ran samples, upload a file with only the new rows, or correct single values under Data.`,
      "file",
      409,
    );
  }
  if (same?.status === "received") return { uploadId: same.id, existing: true };

  const table = parseOrRefuse(input.bytes, input.delimiter, input.decimalComma);
  const { mapping, remembered } = await initialMapping(input.programId, kind, table.headers);
  const parseOptions: StoredParseOptions = {
    delimiter: table.delimiter,
    decimalComma: input.decimalComma,
    hadBom: table.hadBom,
    headers: table.headers,
    mapping,
    mappingRemembered: remembered,
  };
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(schema.uploads)
      .values({
        trialId: input.trialId,
        kind: kind.id,
        filename: input.filename.slice(0, 255) || "upload.csv",
        contentType: input.contentType,
        sizeBytes: input.bytes.length,
        sha256,
        content: Buffer.from(input.bytes),
        rowCount: table.rows.length,
        parseOptions: parseOptions as unknown as Record<string, unknown>,
        uploadedBy: input.actorId,
      })
      .returning({ id: schema.uploads.id });
    await recordAudit(
      {
        programId: input.programId,
        trialId: input.trialId,
        actorId: input.actorId,
        action: "receive",
        entity: "upload",
        entityId: row.id,
        details: { filename: input.filename, kind: kind.id, rows: table.rows.length, sha256, bytes: input.bytes.length },
      },
      tx,
    );
    return { uploadId: row.id, existing: false };
  });
}

/** The program's remembered mapping for these headers, else matching by template names and aliases. */
async function initialMapping(programId: string, kind: KindDef, headers: string[]): Promise<{ mapping: ColumnMapping; remembered: boolean }> {
  const [saved] = await db
    .select()
    .from(schema.columnMappings)
    .where(and(eq(schema.columnMappings.programId, programId), eq(schema.columnMappings.kind, kind.id), eq(schema.columnMappings.headerSignature, headerSignature(headers))));
  if (saved) {
    const mapping: ColumnMapping = {};
    for (const [key, header] of Object.entries(saved.mapping)) {
      const index = headers.indexOf(header);
      if (index >= 0 && kind.fields.some((f) => f.key === key)) mapping[key] = index;
    }
    return { mapping, remembered: true };
  }
  return { mapping: autoMapColumns(kind, headers), remembered: false };
}

async function loadUpload(trialId: string, uploadId: string, t: Tx | typeof db = db, lock = false) {
  if (!/^[0-9a-f-]{36}$/i.test(uploadId)) throw new IntakeError("No such upload in this trial.", undefined, 404);
  const query = t
    .select()
    .from(schema.uploads)
    .where(and(eq(schema.uploads.id, uploadId), eq(schema.uploads.trialId, trialId)));
  const [upload] = lock ? await query.for("update") : await query;
  if (!upload) throw new IntakeError("No such upload in this trial.", undefined, 404);
  return upload;
}

export interface UploadReview {
  upload: {
    id: string;
    filename: string;
    kind: string;
    status: "received" | "committed" | "discarded";
    sizeBytes: number;
    sha256: string;
    rowCount: number | null;
    uploadedAt: Date;
    committedAt: Date | null;
    uploadedBy: string;
  };
  kind: KindDef;
  options: StoredParseOptions;
  missing: { key: string; label: string }[];
  review: Review | null;
}

// Reviews of big files are kept briefly so paging through them does not re-read the file each time.
const reviewCache = new Map<string, UploadReview>();
const REVIEW_CACHE_SIZE = 4;

/**
 * A review stays valid while the trial's data version (bumped by every commit, correction and QC
 * decision) and the upload's mapping are unchanged: new sampling events only add sample codes.
 */
const reviewKey = (uploadId: string, status: string, dataVersion: number, options: StoredParseOptions) =>
  `${uploadId}|${status}|${dataVersion}|${JSON.stringify(options.mapping)}`;

/** Re-reads the stored bytes and checks every row against the trial as it is now. */
export async function reviewUpload(trialId: string, programId: string, uploadId: string): Promise<UploadReview> {
  const upload = await loadUpload(trialId, uploadId);
  const [trial] = await db.select({ dataVersion: schema.trials.dataVersion }).from(schema.trials).where(eq(schema.trials.id, trialId));
  const options = upload.parseOptions as unknown as StoredParseOptions;
  const cacheKey = reviewKey(upload.id, upload.status, trial.dataVersion, options);
  const cached = reviewCache.get(cacheKey);
  if (cached) return cached;
  const [by] = await db.select({ name: schema.users.name }).from(schema.users).where(eq(schema.users.id, upload.uploadedBy));
  const { kind } = await kindOf(programId, upload.kind);
  const missing = missingFields(kind, options.mapping).map((f) => ({ key: f.key, label: f.label }));
  let review: Review | null = null;
  if (missing.length === 0 && upload.status === "received") {
    const table = parseOrRefuse(upload.content, options.delimiter, options.decimalComma);
    review = validateTable(table, options.mapping, options.decimalComma, await intakeContext(trialId, programId, upload.kind));
  }
  const result: UploadReview = {
    upload: {
      id: upload.id,
      filename: upload.filename,
      kind: upload.kind,
      status: upload.status,
      sizeBytes: upload.sizeBytes,
      sha256: upload.sha256,
      rowCount: upload.rowCount,
      uploadedAt: upload.uploadedAt,
      committedAt: upload.committedAt,
      uploadedBy: by?.name ?? "a former member",
    },
    kind,
    options,
    missing,
    review,
  };
  if (reviewCache.size >= REVIEW_CACHE_SIZE) reviewCache.delete(reviewCache.keys().next().value!);
  reviewCache.set(cacheKey, result);
  return result;
}

/**
 * Sets which file column holds each field, and remembers it for the program so the next file
 * with the same headers needs no mapping.
 */
export async function saveColumnMapping(trialId: string, programId: string, actorId: string, uploadId: string, chosen: Record<string, string>) {
  const upload = await loadUpload(trialId, uploadId);
  if (upload.status !== "received") throw new IntakeError("This upload is no longer waiting for review.");
  const options = upload.parseOptions as unknown as StoredParseOptions;
  const { kind } = await kindOf(programId, upload.kind);
  const mapping: ColumnMapping = {};
  const used = new Map<number, string>();
  const errors: Record<string, string[]> = {};
  for (const field of kind.fields) {
    const value = chosen[field.key];
    if (value === undefined || value === "") continue;
    const index = Number(value);
    if (!Number.isInteger(index) || index < 0 || index >= options.headers.length) continue;
    if (used.has(index)) {
      errors[field.key] = [`Column “${options.headers[index]}” is already chosen for ${used.get(index)}.`];
      continue;
    }
    used.set(index, field.label);
    mapping[field.key] = index;
  }
  for (const field of missingFields(kind, mapping)) errors[field.key] ??= [`Choose the column that holds ${field.label.toLowerCase()}.`];
  if (Object.keys(errors).length > 0) return { ok: false as const, errors };
  await db.transaction(async (tx) => {
    await tx
      .update(schema.uploads)
      .set({ parseOptions: { ...options, mapping, mappingRemembered: false } as unknown as Record<string, unknown> })
      .where(eq(schema.uploads.id, upload.id));
    const byHeader = Object.fromEntries(Object.entries(mapping).map(([key, index]) => [key, options.headers[index]]));
    await tx
      .insert(schema.columnMappings)
      .values({ programId, kind: kind.id, headerSignature: headerSignature(options.headers), mapping: byHeader })
      .onConflictDoUpdate({
        target: [schema.columnMappings.programId, schema.columnMappings.kind, schema.columnMappings.headerSignature],
        set: { mapping: byHeader, updatedAt: new Date() },
      });
    await recordAudit({ programId, trialId, actorId, action: "map_columns", entity: "upload", entityId: upload.id, details: { mapping: byHeader } }, tx);
  });
  return { ok: true as const };
}

export interface CommitOptions {
  /** The person confirmed the rows with warnings. */
  confirmWarnings: boolean;
  /** Rows per INSERT statement. */
  chunkSize?: number;
  /** Called inside the transaction after each chunk (tests interrupt the commit here). */
  afterChunk?: (tx: Tx, rowsWritten: number) => Promise<void>;
}

export interface CommitResult {
  uploadId: string;
  filename: string;
  kind: KindDef;
  rows: number;
  warnings: number;
  dataVersion: number;
  /** The sampling event every row belongs to, or null for a file spanning several. */
  eventId: string | null;
}

/**
 * Commits an upload: in one transaction (the trial row locked so commits queue), re-reads and
 * re-checks every row against the trial as it is at that moment, then writes all measurements
 * with multi-row INSERTs, marks the upload committed and bumps the trial's data version. Any
 * error, or warnings not confirmed, refuses the whole file; a failure midway leaves nothing.
 */
export async function commitUpload(trialId: string, programId: string, actorId: string, uploadId: string, options: CommitOptions): Promise<CommitResult> {
  const chunkSize = options.chunkSize ?? 10_000;
  return db.transaction(async (tx) => {
    const [trial] = await tx.select().from(schema.trials).where(eq(schema.trials.id, trialId)).for("update");
    if (!trial) throw new IntakeError("No such trial.", undefined, 404);
    const upload = await loadUpload(trialId, uploadId, tx, true);
    if (upload.status === "committed") throw new IntakeError("This upload is already committed; nothing was written twice.", undefined, 409);
    if (upload.status === "discarded") throw new IntakeError("This upload was discarded. Upload the file again to review it.", undefined, 409);
    const parseOptions = upload.parseOptions as unknown as StoredParseOptions;
    // The trial row is locked, so a review made at this data version is still the truth; else check again.
    const cached = reviewCache.get(reviewKey(upload.id, "received", trial.dataVersion, parseOptions))?.review;
    let review: Review;
    let kind: KindDef;
    if (cached) {
      review = cached;
      kind = (await kindOf(programId, upload.kind, tx)).kind;
    } else {
      const context = await intakeContext(trialId, programId, upload.kind, tx);
      kind = context.kind;
      const missing = missingFields(context.kind, parseOptions.mapping);
      if (missing.length > 0) throw new IntakeError(`Choose the columns for ${missing.map((f) => f.label.toLowerCase()).join(", ")} first.`);
      const table = parseOrRefuse(upload.content, parseOptions.delimiter, parseOptions.decimalComma);
      review = validateTable(table, parseOptions.mapping, parseOptions.decimalComma, context);
    }
    if (review.counts.error > 0) {
      throw new IntakeError(
        `${review.counts.error} row${review.counts.error === 1 ? " has" : "s have"} errors, so nothing was committed. Fix them in the file and upload it again.`,
      );
    }
    if (review.counts.warning > 0 && !options.confirmWarnings) {
      throw new IntakeError(
        `${review.counts.warning} row${review.counts.warning === 1 ? " has a warning" : "s have warnings"}. Look at them, then tick “I checked the warnings” to commit.`,
        "confirmWarnings",
      );
    }
    // Multi-row inserts: each statement sends a chunk of rows as one JSON array, unpacked by PostgreSQL.
    let written = 0;
    for (let start = 0; start < review.rows.length; start += chunkSize) {
      const chunk = review.rows.slice(start, start + chunkSize).map((row) => ({ sample_id: row.sampleId!, inputs: row.inputs, source_row: row.rowNumber }));
      await tx.execute(sql`
        insert into ${schema.measurements} (sample_id, upload_id, kind, inputs, source_row, entered_by)
        select x.sample_id, ${upload.id}::uuid, ${kind.id}, x.inputs, x.source_row, ${actorId}
        from jsonb_to_recordset(${JSON.stringify(chunk)}::jsonb) as x(sample_id uuid, inputs jsonb, source_row integer)`);
      written += chunk.length;
      if (options.afterChunk) await options.afterChunk(tx, written);
    }
    const committedAt = new Date();
    const events = new Set(review.rows.map((r) => r.eventId));
    const eventId = events.size === 1 ? [...events][0] : null;
    await tx
      .update(schema.uploads)
      .set({ status: "committed", committedAt, rowCount: written, eventId })
      .where(eq(schema.uploads.id, upload.id));
    const [{ dataVersion }] = await tx
      .update(schema.trials)
      .set({ dataVersion: sql`${schema.trials.dataVersion} + 1`, updatedAt: committedAt })
      .where(eq(schema.trials.id, trialId))
      .returning({ dataVersion: schema.trials.dataVersion });
    await recordAudit(
      {
        programId,
        trialId,
        actorId,
        action: "commit",
        entity: "upload",
        entityId: upload.id,
        details: { filename: upload.filename, kind: kind.id, rows: written, warningsConfirmed: review.counts.warning, sha256: upload.sha256, dataVersion },
      },
      tx,
    );
    return { uploadId: upload.id, filename: upload.filename, kind, rows: written, warnings: review.counts.warning, dataVersion, eventId };
  });
}

/** Sets a waiting upload aside; its bytes stay stored, nothing is committed. */
export async function discardUpload(trialId: string, programId: string, actorId: string, uploadId: string) {
  await db.transaction(async (tx) => {
    const upload = await loadUpload(trialId, uploadId, tx, true);
    if (upload.status !== "received") throw new IntakeError("Only an upload waiting for review can be discarded.", undefined, 409);
    await tx.update(schema.uploads).set({ status: "discarded" }).where(eq(schema.uploads.id, upload.id));
    await recordAudit({ programId, trialId, actorId, action: "discard", entity: "upload", entityId: upload.id, details: { filename: upload.filename } }, tx);
  });
}

export async function listUploads(trialId: string, limit = 50) {
  return db
    .select({
      id: schema.uploads.id,
      filename: schema.uploads.filename,
      kind: schema.uploads.kind,
      status: schema.uploads.status,
      rowCount: schema.uploads.rowCount,
      sizeBytes: schema.uploads.sizeBytes,
      uploadedAt: schema.uploads.uploadedAt,
      committedAt: schema.uploads.committedAt,
      uploadedBy: schema.users.name,
    })
    .from(schema.uploads)
    .innerJoin(schema.users, eq(schema.users.id, schema.uploads.uploadedBy))
    .where(eq(schema.uploads.trialId, trialId))
    .orderBy(desc(schema.uploads.uploadedAt))
    .limit(limit);
}

/** The stored bytes, exactly as received. */
export async function originalFile(trialId: string, uploadId: string) {
  const upload = await loadUpload(trialId, uploadId);
  return { filename: upload.filename, contentType: upload.contentType, content: upload.content, sha256: upload.sha256 };
}
