// Tilthmark's tables. Raw inputs are stored; derived values (SOM, SOC, stocks) are computed
// by analysis/ and never stored as typed numbers.
import { sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  customType,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgTable,
  serial,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import { programs, users } from "./auth-schema";

export * from "./auth-schema";

const bytea = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => "bytea",
});

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();
const updatedAt = () => timestamp("updated_at", { withTimezone: true }).notNull().defaultNow();
const programRef = () =>
  text("program_id")
    .notNull()
    .references(() => programs.id, { onDelete: "cascade" });

export const TRIAL_STATUSES = ["draft", "locked", "running", "closed"] as const;
export const TRIAL_DESIGNS = ["crd", "rcbd", "factorial_rcbd", "split_plot"] as const;

export const sites = pgTable(
  "site",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    name: text("name").notNull(),
    latitude: doublePrecision("latitude"),
    longitude: doublePrecision("longitude"),
    soilSeries: text("soil_series"),
    textureClass: text("texture_class"),
    sandPct: doublePrecision("sand_pct"),
    siltPct: doublePrecision("silt_pct"),
    clayPct: doublePrecision("clay_pct"),
    notes: text("notes"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("site_program_name_idx").on(t.programId, t.name)],
);

export const trials = pgTable(
  "trial",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    siteId: uuid("site_id").references(() => sites.id, { onDelete: "restrict" }),
    title: text("title").notNull(),
    objective: text("objective"),
    hypotheses: text("hypotheses"),
    status: text("status", { enum: TRIAL_STATUSES }).notNull().default("draft"),
    design: text("design", { enum: TRIAL_DESIGNS }).notNull().default("rcbd"),
    plotLengthM: doublePrecision("plot_length_m"),
    plotWidthM: doublePrecision("plot_width_m"),
    alleyBetweenPlotsM: doublePrecision("alley_between_plots_m"),
    alleyBetweenBlocksM: doublePrecision("alley_between_blocks_m"),
    blockCount: integer("block_count"),
    randomizationSeed: integer("randomization_seed"),
    /** Plot numbering within blocks: straight, or serpentine (every other block reversed). */
    arrangement: text("arrangement", { enum: ["straight", "serpentine"] }).notNull().default("straight"),
    /** Blocks laid side by side as rows or as columns of the field. */
    blockOrientation: text("block_orientation", { enum: ["rows", "columns"] }).notNull().default("rows"),
    /** Compass bearing, whole degrees clockwise from true north, that the top of the plot map faces in the field. */
    mapBearingDeg: integer("map_bearing_deg").notNull().default(0),
    labMethodId: uuid("lab_method_id"),
    socFactor: doublePrecision("soc_factor").notNull().default(1.724),
    /** Bumped on every committed data change; results are cached by it. */
    dataVersion: integer("data_version").notNull().default(0),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    lockedAt: timestamp("locked_at", { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("trial_program_idx").on(t.programId)],
);

export const treatments = pgTable(
  "treatment",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    code: text("code").notNull(),
    name: text("name").notNull(),
    description: text("description"),
    isCheck: boolean("is_check").notNull().default(false),
    position: integer("position").notNull().default(0),
    /** Factorial and split-plot trials: the level of each factor, e.g. { amendment: "compost", rate: "20" }. */
    factorLevels: jsonb("factor_levels").$type<Record<string, string>>(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("treatment_trial_code_idx").on(t.trialId, t.code)],
);

export const blocks = pgTable(
  "block",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    number: integer("number").notNull(),
  },
  (t) => [uniqueIndex("block_trial_number_idx").on(t.trialId, t.number)],
);

export const plots = pgTable(
  "plot",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    blockId: uuid("block_id")
      .notNull()
      .references(() => blocks.id, { onDelete: "cascade" }),
    treatmentId: uuid("treatment_id")
      .notNull()
      .references(() => treatments.id, { onDelete: "restrict" }),
    /** Field convention: block × 100 + position within the block. */
    plotNumber: integer("plot_number").notNull(),
    positionInBlock: integer("position_in_block").notNull(),
    /** For split-plot designs: the main plot this sub-plot lies in. */
    mainPlotNumber: integer("main_plot_number"),
    /** Position on the field grid (0-based), as drawn on the plot map. */
    fieldRow: integer("field_row").notNull().default(0),
    fieldColumn: integer("field_column").notNull().default(0),
  },
  (t) => [uniqueIndex("plot_trial_number_idx").on(t.trialId, t.plotNumber)],
);

export const seasons = pgTable(
  "season",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    label: text("label").notNull(),
    ordinal: integer("ordinal").notNull(),
  },
  (t) => [uniqueIndex("season_trial_label_idx").on(t.trialId, t.label)],
);

export type DepthIncrement = { topCm: number; bottomCm: number };

export const samplingEvents = pgTable(
  "sampling_event",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    seasonId: uuid("season_id")
      .notNull()
      .references(() => seasons.id, { onDelete: "restrict" }),
    eventDate: date("event_date").notNull(),
    isBaseline: boolean("is_baseline").notNull().default(false),
    depths: jsonb("depths").$type<DepthIncrement[]>().notNull(),
    variables: jsonb("variables").$type<string[]>().notNull().default(sql`'[]'::jsonb`),
    createdAt: createdAt(),
  },
  (t) => [index("sampling_event_trial_idx").on(t.trialId)],
);

export const samples = pgTable(
  "sample",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    eventId: uuid("event_id")
      .notNull()
      .references(() => samplingEvents.id, { onDelete: "cascade" }),
    plotId: uuid("plot_id")
      .notNull()
      .references(() => plots.id, { onDelete: "restrict" }),
    topCm: doublePrecision("top_cm").notNull(),
    bottomCm: doublePrecision("bottom_cm").notNull(),
    code: text("code").notNull(),
  },
  (t) => [uniqueIndex("sample_trial_code_idx").on(t.trialId, t.code)],
);

/** Files exactly as received: never altered, so a database backup holds everything. */
export const uploads = pgTable(
  "upload",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "restrict" }),
    kind: text("kind").notNull(),
    eventId: uuid("event_id").references(() => samplingEvents.id, { onDelete: "restrict" }),
    filename: text("filename").notNull(),
    contentType: text("content_type"),
    sizeBytes: integer("size_bytes").notNull(),
    sha256: text("sha256").notNull(),
    content: bytea("content").notNull(),
    status: text("status", { enum: ["received", "committed", "discarded"] })
      .notNull()
      .default("received"),
    rowCount: integer("row_count"),
    /** How the bytes were read: delimiter, decimal comma, column mapping. */
    parseOptions: jsonb("parse_options").$type<Record<string, unknown>>(),
    uploadedBy: text("uploaded_by")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    uploadedAt: timestamp("uploaded_at", { withTimezone: true }).notNull().defaultNow(),
    committedAt: timestamp("committed_at", { withTimezone: true }),
  },
  (t) => [index("upload_trial_idx").on(t.trialId)],
);

/** One measured row: raw inputs as received (masses, dimensions, readings) keyed by variable. */
export const measurements = pgTable(
  "measurement",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    sampleId: uuid("sample_id")
      .notNull()
      .references(() => samples.id, { onDelete: "restrict" }),
    uploadId: uuid("upload_id").references(() => uploads.id, { onDelete: "restrict" }),
    kind: text("kind").notNull(),
    inputs: jsonb("inputs").$type<Record<string, number | string | null>>().notNull(),
    sourceRow: integer("source_row"),
    status: text("status", { enum: ["ok", "excluded"] }).notNull().default("ok"),
    statusReason: text("status_reason"),
    supersedes: uuid("supersedes"),
    enteredBy: text("entered_by")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    createdAt: createdAt(),
  },
  (t) => [index("measurement_sample_idx").on(t.sampleId), index("measurement_upload_idx").on(t.uploadId)],
);

export const auditLog = pgTable(
  "audit_log",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    programId: text("program_id").references(() => programs.id, { onDelete: "cascade" }),
    trialId: uuid("trial_id").references(() => trials.id, { onDelete: "cascade" }),
    actorId: text("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    entity: text("entity").notNull(),
    entityId: text("entity_id"),
    details: jsonb("details").$type<Record<string, unknown>>(),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("audit_program_idx").on(t.programId, t.at)],
);

/** Messages captured by the local SMTP fake (demo mode and tests only). */
export const mailboxMessages = pgTable("mailbox_message", {
  id: serial("id").primaryKey(),
  envelopeFrom: text("envelope_from"),
  envelopeTo: text("envelope_to").notNull(),
  subject: text("subject"),
  text: text("text"),
  html: text("html"),
  receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
});

export const AMENDMENT_MATERIALS = [
  "compost",
  "leaf_mould",
  "spent_coffee_grounds",
  "manure",
  "biochar",
  "cardboard",
  "microbial_drench",
  "fungal_inoculant",
  "other",
] as const;

export const amendments = pgTable(
  "amendment",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    name: text("name").notNull(),
    material: text("material", { enum: AMENDMENT_MATERIALS }).notNull(),
    description: text("description"),
    source: text("source"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("amendment_program_name_idx").on(t.programId, t.name)],
);

/** One delivery or lot of an amendment with its lab analysis. Moisture is wet basis (lab reports). */
export const amendmentBatches = pgTable(
  "amendment_batch",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    amendmentId: uuid("amendment_id")
      .notNull()
      .references(() => amendments.id, { onDelete: "cascade" }),
    label: text("label").notNull(),
    receivedOn: date("received_on"),
    moistureWetBasisPct: doublePrecision("moisture_wet_basis_pct"),
    totalCarbonDryPct: doublePrecision("total_carbon_dry_pct"),
    totalNitrogenDryPct: doublePrecision("total_nitrogen_dry_pct"),
    ph: doublePrecision("ph"),
    ecDsPerM: doublePrecision("ec_ds_per_m"),
    /** Composts and manures: how the pile was managed, which decides the pathogen-reduction rule. */
    compostingMethod: text("composting_method", { enum: ["turned_windrow", "static_pile", "in_vessel"] }),
    notes: text("notes"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("batch_amendment_label_idx").on(t.amendmentId, t.label)],
);

export const batchTemperatureReadings = pgTable(
  "batch_temperature_reading",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    batchId: uuid("batch_id")
      .notNull()
      .references(() => amendmentBatches.id, { onDelete: "cascade" }),
    readAt: timestamp("read_at", { withTimezone: false }).notNull(),
    probeC: doublePrecision("probe_c").notNull(),
    turned: boolean("turned").notNull().default(false),
  },
  (t) => [index("temperature_batch_idx").on(t.batchId, t.readAt)],
);

export const TIMINGS = ["once", "each_season", "every_n_weeks"] as const;

/** What a treatment puts on a plot: a batch at a dry-matter rate or as a layer. */
export const treatmentApplications = pgTable(
  "treatment_application",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    treatmentId: uuid("treatment_id")
      .notNull()
      .references(() => treatments.id, { onDelete: "cascade" }),
    batchId: uuid("batch_id").references(() => amendmentBatches.id, { onDelete: "restrict" }),
    rateMgDmPerHa: doublePrecision("rate_mg_dm_per_ha"),
    layerDepthCm: doublePrecision("layer_depth_cm"),
    timing: text("timing", { enum: TIMINGS }).notNull().default("once"),
    everyNWeeks: integer("every_n_weeks"),
    notes: text("notes"),
  },
  (t) => [index("application_treatment_idx").on(t.treatmentId)],
);

/** Factors of factorial and split-plot trials; treatments are their level combinations. */
export const trialFactors = pgTable(
  "trial_factor",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    levels: jsonb("levels").$type<string[]>().notNull(),
    /** Split-plot only: which factor goes on main plots and which on sub-plots. */
    stratum: text("stratum", { enum: ["main", "sub"] }),
    position: integer("position").notNull().default(0),
  },
  (t) => [uniqueIndex("factor_trial_name_idx").on(t.trialId, t.name)],
);

/** A lab's LOI method and its calibration SOM = slope·LOI + intercept (identity by default). */
export const labMethods = pgTable(
  "lab_method",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    name: text("name").notNull(),
    ignitionC: doublePrecision("ignition_c"),
    ignitionHours: doublePrecision("ignition_hours"),
    somSlope: doublePrecision("som_slope").notNull().default(1),
    somIntercept: doublePrecision("som_intercept").notNull().default(0),
    notes: text("notes"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("lab_method_program_name_idx").on(t.programId, t.name)],
);

/** Program-registered variables beyond the built-in ones (earthworms per m², pH, yield …). */
export const customVariables = pgTable(
  "custom_variable",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    variableId: text("variable_id").notNull(),
    label: text("label").notNull(),
    unit: text("unit").notNull(),
    decimals: integer("decimals").notNull().default(2),
    minValue: doublePrecision("min_value"),
    maxValue: doublePrecision("max_value"),
    description: text("description"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("custom_variable_program_id_idx").on(t.programId, t.variableId)],
);

/** A column mapping chosen once per program for a set of file headers, then reused. */
export const columnMappings = pgTable(
  "column_mapping",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    kind: text("kind").notNull(),
    headerSignature: text("header_signature").notNull(),
    mapping: jsonb("mapping").$type<Record<string, string>>().notNull(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("column_mapping_key_idx").on(t.programId, t.kind, t.headerSignature)],
);

/** The ESM reference mass, fixed once per trial and depth span so every season compares alike. */
export const referenceMasses = pgTable(
  "reference_mass",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    topCm: doublePrecision("top_cm").notNull(),
    bottomCm: doublePrecision("bottom_cm").notNull(),
    massMgPerHa: doublePrecision("mass_mg_per_ha").notNull(),
    fixedBy: text("fixed_by").references(() => users.id, { onDelete: "set null" }),
    fixedAt: timestamp("fixed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("reference_mass_span_idx").on(t.trialId, t.topCm, t.bottomCm)],
);

/** Named contrasts a researcher saves for a trial: one coefficient per treatment code. */
export const contrasts = pgTable(
  "contrast",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    coefficients: jsonb("coefficients").$type<Record<string, number>>().notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("contrast_trial_name_idx").on(t.trialId, t.name)],
);

/** Keys for scripts calling the JSON routes. Only a SHA-256 of the key is kept; it is shown once. */
export const apiKeys = pgTable(
  "api_key",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** The first characters, to tell keys apart in lists. */
    prefix: text("prefix").notNull(),
    keyHash: text("key_hash").notNull().unique(),
    createdAt: createdAt(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("api_key_user_idx").on(t.userId)],
);

/** A field brief: a citable summary series for one trial; each publication is a frozen version. */
export const briefs = pgTable(
  "brief",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    programId: programRef(),
    trialId: uuid("trial_id")
      .notNull()
      .references(() => trials.id, { onDelete: "restrict" }),
    title: text("title").notNull(),
    /** Readable by anyone with the link, without signing in (page and CSV). */
    isPublic: boolean("is_public").notNull().default(false),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("brief_program_idx").on(t.programId)],
);

/** One published version: its numbers, chart data and text are stored and never recomputed. */
export const briefVersions = pgTable(
  "brief_version",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    briefId: uuid("brief_id")
      .notNull()
      .references(() => briefs.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    title: text("title").notNull(),
    summary: text("summary").notNull(),
    context: text("context"),
    authors: text("authors").notNull(),
    /** The frozen summary tables, chart data and selection, exactly as published. */
    content: jsonb("content").$type<Record<string, unknown>>().notNull(),
    includeWater: boolean("include_water").notNull().default(false),
    dataVersion: integer("data_version").notNull(),
    publishedBy: text("published_by").references(() => users.id, { onDelete: "set null" }),
    publishedAt: timestamp("published_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("brief_version_idx").on(t.briefId, t.version)],
);
