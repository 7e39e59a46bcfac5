// Field briefs: drafted from the results of the moment, published as frozen versions that never
// change when data change later, readable by extension agents (and by anyone, when public).
import { and, asc, desc, eq, max } from "drizzle-orm";
import { briefRows, briefSentence, type BriefSection } from "../../analysis/briefs";
import { somWaterHoldingEstimate, type RoughEstimate } from "../../analysis/units";
import { VARIABLES, type BuiltInVariableId } from "../../analysis/variables";
import { recordAudit } from "./audit";
import { db, schema } from "./db";
import { env } from "./env";
import { sendMail } from "./mail";
import { seasonMeansChart } from "./results/charts";
import { ResultsError, selectObservations, trialData, trialResults, type ResultsQuery } from "./results/service";

export type BriefSelection = {
  variables: string[];
  depth?: string;
  season?: string;
  method: "tukey" | "lsd";
  alpha: number;
};

export type BriefContent = {
  trial: { id: string; title: string; site: string | null; soil: string | null; design: string };
  sections: BriefSection[];
  water: (RoughEstimate & { treatment: string; somIncrease: number; depthCm: number })[];
  cautions: string[];
};

/** The cautions every brief carries (DESIGN.md, "Cautions, shown where the work happens"). */
export const BRIEF_CAUTIONS = [
  "Manure and immature compost can carry pathogens: wear gloves, wash hands, and keep to the intervals between application and harvest that your local rules set.",
  "Nitrogen and phosphorus applied with amendments count toward nutrient-management and nutrient-loading rules where you farm; check them before choosing rates.",
  "These results come from one site and one soil over the seasons shown; local conditions differ, and so may the response.",
  "Tilthmark reports research estimates, not regulatory compliance. Local codes, extension specialists and licensed practice come first.",
];

async function baselineMeans(trialId: string, query: ResultsQuery): Promise<{ season: string | null; means: Map<string, number> }> {
  const data = await trialData(trialId);
  const { observations } = await selectObservations(data, { ...query, season: undefined });
  const baseline = observations.filter((o) => o.isBaseline && o.value !== null);
  const sums = new Map<string, { sum: number; n: number }>();
  for (const o of baseline) {
    const s = sums.get(o.treatment) ?? { sum: 0, n: 0 };
    sums.set(o.treatment, { sum: s.sum + (o.value as number), n: s.n + 1 });
  }
  return {
    season: baseline[0]?.season ?? null,
    means: new Map([...sums].map(([code, s]) => [code, s.sum / s.n])),
  };
}

/** The summary a researcher starts from: one section per variable, sentences from the numbers. */
export async function draftBrief(trialId: string, selection: BriefSelection, includeWater = false): Promise<BriefContent> {
  if (selection.variables.length === 0) throw new ResultsError("Choose at least one variable for the brief.");
  const data = await trialData(trialId);
  const [trialRow] = await db
    .select({ siteName: schema.sites.name, soilSeries: schema.sites.soilSeries, texture: schema.sites.textureClass })
    .from(schema.trials)
    .leftJoin(schema.sites, eq(schema.sites.id, schema.trials.siteId))
    .where(eq(schema.trials.id, trialId));
  const sections: BriefSection[] = [];
  for (const variableId of selection.variables) {
    const query: ResultsQuery = {
      variable: variableId,
      depth: selection.depth,
      model: "per_season",
      season: selection.season,
      method: selection.method,
      alpha: selection.alpha,
    };
    const view = await trialResults(trialId, query);
    const baseline = await baselineMeans(trialId, query);
    const chart = await seasonMeansChart(trialId, query);
    const builtIn = VARIABLES[variableId as BuiltInVariableId];
    const partial: Omit<BriefSection, "sentence"> = {
      variable: {
        id: variableId,
        label: view.selection.variable.label,
        unit: view.selection.variable.unit,
        siUnit: builtIn?.unit ?? null,
        decimals: view.selection.variable.decimals,
      },
      depthLabel: view.selection.depth.label,
      season: view.results.season ?? "",
      baselineSeason: baseline.season,
      method: selection.method,
      alpha: selection.alpha,
      rows: briefRows(view.results, baseline.means),
      chart: chart.points.map(({ season, seasonOrder, code, mean, se }) => ({ season, seasonOrder, code, mean, se })),
    };
    sections.push({ ...partial, sentence: briefSentence(partial) });
  }
  const water: BriefContent["water"] = [];
  if (includeWater) {
    const som = sections.find((s) => s.variable.id === "som");
    if (!som) throw new ResultsError("The water estimate is based on soil organic matter: include SOM in the brief.");
    const depthMatch = /^(\d+)–(\d+)/.exec(som.depthLabel);
    const depthCm = depthMatch ? Number(depthMatch[2]) - Number(depthMatch[1]) : 30;
    for (const row of som.rows) {
      if (row.vsCheck && row.vsCheck.significant && row.vsCheck.diff > 0) {
        const increase = Math.round(row.vsCheck.diff * 100) / 100;
        water.push({ ...somWaterHoldingEstimate(increase, depthCm), treatment: row.name, somIncrease: increase, depthCm });
      }
    }
  }
  return {
    trial: {
      id: trialId,
      title: data.trial.title,
      site: trialRow?.siteName ?? null,
      // "Cedar Hollow silt loam, eroded phase" already names its texture: don't repeat it.
      soil: [trialRow?.soilSeries, trialRow?.texture && !trialRow.soilSeries?.toLowerCase().includes(trialRow.texture.toLowerCase()) ? trialRow.texture : null].filter(Boolean).join(", ") || null,
      design: data.trial.design,
    },
    sections,
    water,
    cautions: BRIEF_CAUTIONS,
  };
}

export type PublishInput = {
  briefId: string | null;
  title: string;
  summary: string;
  context: string | null;
  authors: string;
  isPublic: boolean;
  includeWater: boolean;
  selection: BriefSelection;
  /** E-mail the program's extension agents (default true). */
  notify?: boolean;
};

/**
 * Publishes a new brief, or a new version of an existing one, in one transaction; the content is
 * computed now and stored as it is. Extension agents of the program who want it get an e-mail.
 */
export async function publishBrief(actor: { id: string; programId: string }, trialId: string, input: PublishInput) {
  const content = await draftBrief(trialId, input.selection, input.includeWater);
  const data = await trialData(trialId);
  const published = await db.transaction(async (tx) => {
    let briefId = input.briefId;
    if (briefId) {
      const [existing] = await tx
        .select()
        .from(schema.briefs)
        .where(and(eq(schema.briefs.id, briefId), eq(schema.briefs.trialId, trialId)));
      if (!existing) throw new ResultsError("That brief does not belong to this trial.");
      await tx.update(schema.briefs).set({ title: input.title, isPublic: input.isPublic }).where(eq(schema.briefs.id, briefId));
    } else {
      const [created] = await tx
        .insert(schema.briefs)
        .values({ programId: actor.programId, trialId, title: input.title, isPublic: input.isPublic, createdBy: actor.id })
        .returning();
      briefId = created.id;
    }
    const [{ latest }] = await tx.select({ latest: max(schema.briefVersions.version) }).from(schema.briefVersions).where(eq(schema.briefVersions.briefId, briefId));
    const version = (latest ?? 0) + 1;
    await tx.insert(schema.briefVersions).values({
      briefId,
      version,
      title: input.title,
      summary: input.summary,
      context: input.context,
      authors: input.authors,
      content: content as unknown as Record<string, unknown>,
      includeWater: input.includeWater,
      dataVersion: data.trial.dataVersion,
      publishedBy: actor.id,
    });
    await recordAudit(
      { programId: actor.programId, trialId, actorId: actor.id, action: "publish", entity: "brief", entityId: briefId, details: { version, title: input.title, isPublic: input.isPublic } },
      tx,
    );
    return { briefId, version };
  });
  if (input.notify !== false) {
    await notifyExtensionAgents(actor.programId, published.briefId, input.title).catch((error: Error) =>
      console.error("[briefs] notification failed:", error.message),
    );
  }
  return published;
}

async function notifyExtensionAgents(programId: string, briefId: string, title: string) {
  const recipients = await db
    .select({ email: schema.users.email, name: schema.users.name })
    .from(schema.members)
    .innerJoin(schema.users, eq(schema.users.id, schema.members.userId))
    .where(and(eq(schema.members.organizationId, programId), eq(schema.members.role, "extension"), eq(schema.users.notifyBriefs, true)));
  const link = new URL(`/briefs/${briefId}`, env.TILTHMARK_BASE_URL).toString();
  for (const r of recipients) {
    await sendMail({
      to: r.email,
      subject: `New field brief: ${title}`,
      text: [
        `Hello ${r.name},`,
        "",
        `A new field brief was published in Tilthmark: ${title}`,
        link,
        "",
        "You get these messages as an extension agent of the program. To stop them, change the setting on your account page.",
      ].join("\n"),
    });
  }
}

export async function listBriefs(filter: { programId?: string; trialId?: string }) {
  const where = filter.trialId ? eq(schema.briefs.trialId, filter.trialId) : eq(schema.briefs.programId, filter.programId!);
  const rows = await db
    .select({
      id: schema.briefs.id,
      title: schema.briefs.title,
      isPublic: schema.briefs.isPublic,
      trialTitle: schema.trials.title,
      version: schema.briefVersions.version,
      publishedAt: schema.briefVersions.publishedAt,
      authors: schema.briefVersions.authors,
    })
    .from(schema.briefs)
    .innerJoin(schema.trials, eq(schema.trials.id, schema.briefs.trialId))
    .innerJoin(schema.briefVersions, eq(schema.briefVersions.briefId, schema.briefs.id))
    .where(where)
    .orderBy(desc(schema.briefVersions.publishedAt));
  // Latest version of each brief.
  const seen = new Set<string>();
  return rows.filter((r) => (seen.has(r.id) ? false : (seen.add(r.id), true)));
}

export async function findBrief(briefId: string) {
  if (!/^[0-9a-f-]{36}$/i.test(briefId)) return null;
  const [brief] = await db.select().from(schema.briefs).where(eq(schema.briefs.id, briefId));
  return brief ?? null;
}

export async function briefVersion(briefId: string, version: number | null) {
  const versions = await db
    .select({ version: schema.briefVersions.version, publishedAt: schema.briefVersions.publishedAt })
    .from(schema.briefVersions)
    .where(eq(schema.briefVersions.briefId, briefId))
    .orderBy(asc(schema.briefVersions.version));
  const wanted = version ?? versions.at(-1)?.version;
  if (wanted === undefined) return null;
  const [row] = await db
    .select()
    .from(schema.briefVersions)
    .where(and(eq(schema.briefVersions.briefId, briefId), eq(schema.briefVersions.version, wanted)));
  if (!row) return null;
  return { ...row, content: row.content as unknown as BriefContent, versions };
}
