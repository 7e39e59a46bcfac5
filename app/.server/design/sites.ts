// Sites: where a trial's field lies and its soil.
import { and, asc, eq } from "drizzle-orm";
import { z } from "zod";
import { recordAudit } from "../audit";
import { db, schema } from "../db";
import { DesignError } from "./errors";
import { optionalNumber, optionalText, requiredText } from "./inputs";

/** The twelve USDA soil texture classes (Soil Survey Manual, USDA Handbook 18, 2017). */
export const TEXTURE_CLASSES = [
  "sand",
  "loamy sand",
  "sandy loam",
  "loam",
  "silt loam",
  "silt",
  "sandy clay loam",
  "clay loam",
  "silty clay loam",
  "sandy clay",
  "silty clay",
  "clay",
] as const;

/** Sand + silt + clay may differ from 100 by rounding only. */
const PARTICLE_SUM_TOLERANCE = 0.5;

export const SiteInput = z
  .object({
    name: requiredText("a site name", 120),
    latitude: optionalNumber("Latitude", { min: -90, max: 90, unit: "°" }),
    longitude: optionalNumber("Longitude", { min: -180, max: 180, unit: "°" }),
    soilSeries: optionalText(200),
    textureClass: z
      .string()
      .optional()
      .transform((v) => (v ? v : null))
      .pipe(z.enum(TEXTURE_CLASSES, { error: "Choose one of the USDA texture classes." }).nullable()),
    sandPct: optionalNumber("Sand", { min: 0, max: 100, unit: "%" }),
    siltPct: optionalNumber("Silt", { min: 0, max: 100, unit: "%" }),
    clayPct: optionalNumber("Clay", { min: 0, max: 100, unit: "%" }),
    notes: optionalText(4000),
  })
  .superRefine((v, ctx) => {
    if ((v.latitude === null) !== (v.longitude === null)) {
      ctx.addIssue({ code: "custom", path: [v.latitude === null ? "latitude" : "longitude"], message: "Give both latitude and longitude, or neither." });
    }
    const parts = [v.sandPct, v.siltPct, v.clayPct];
    const given = parts.filter((p) => p !== null).length;
    if (given > 0 && given < 3) {
      const missing = (["sandPct", "siltPct", "clayPct"] as const).find((k) => v[k] === null)!;
      ctx.addIssue({ code: "custom", path: [missing], message: "Give sand, silt and clay together, or none of them." });
    } else if (given === 3) {
      const sum = (v.sandPct ?? 0) + (v.siltPct ?? 0) + (v.clayPct ?? 0);
      if (Math.abs(sum - 100) > PARTICLE_SUM_TOLERANCE) {
        ctx.addIssue({ code: "custom", path: ["clayPct"], message: `Sand, silt and clay must add up to 100 % (they add up to ${Math.round(sum * 10) / 10} %).` });
      }
    }
  });
export type SiteInput = z.output<typeof SiteInput>;

export async function listSites(programId: string) {
  return db.select().from(schema.sites).where(eq(schema.sites.programId, programId)).orderBy(asc(schema.sites.name));
}

export async function getSite(programId: string, siteId: string) {
  if (!/^[0-9a-f-]{36}$/i.test(siteId)) return null;
  const [site] = await db.select().from(schema.sites).where(and(eq(schema.sites.id, siteId), eq(schema.sites.programId, programId)));
  return site ?? null;
}

async function assertNameFree(programId: string, name: string, exceptId?: string) {
  const [clash] = await db
    .select({ id: schema.sites.id })
    .from(schema.sites)
    .where(and(eq(schema.sites.programId, programId), eq(schema.sites.name, name)));
  if (clash && clash.id !== exceptId) throw new DesignError(`This program already has a site called “${name}”.`, "name");
}

export async function createSite(actorId: string, programId: string, input: SiteInput) {
  await assertNameFree(programId, input.name);
  return db.transaction(async (tx) => {
    const [site] = await tx.insert(schema.sites).values({ programId, ...input }).returning();
    await recordAudit({ programId, actorId, action: "create", entity: "site", entityId: site.id, details: { ...input } }, tx);
    return site;
  });
}

export async function updateSite(actorId: string, programId: string, siteId: string, input: SiteInput) {
  await assertNameFree(programId, input.name, siteId);
  return db.transaction(async (tx) => {
    const [site] = await tx
      .update(schema.sites)
      .set({ ...input, updatedAt: new Date() })
      .where(and(eq(schema.sites.id, siteId), eq(schema.sites.programId, programId)))
      .returning();
    if (!site) throw new DesignError("That site is not in this program.");
    await recordAudit({ programId, actorId, action: "update", entity: "site", entityId: siteId, details: { ...input } }, tx);
    return site;
  });
}
