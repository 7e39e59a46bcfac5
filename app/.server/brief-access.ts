import { data } from "react-router";
import type { UnitSystem } from "../../analysis/units";
import { briefVersion, findBrief } from "./briefs";
import { db, schema } from "./db";
import { eq } from "drizzle-orm";
import { requirePermission, requireUser } from "./permissions";
import { getSession } from "./session";

/**
 * The brief version a request may read: a public brief is open to anyone; otherwise the reader needs
 * briefs.view in the brief's program (signed out → sign-in, other programs → 403). An unknown brief
 * looks the same as a private one to a signed-out visitor, so links reveal nothing.
 */
export async function readableBrief(request: Request, briefId: string, versionParam: string | undefined) {
  const brief = await findBrief(briefId);
  if (!brief || !brief.isPublic) {
    await requireUser(request);
    if (!brief) throw data("No such field brief.", { status: 404 });
    await requirePermission(request, { programId: brief.programId }, "briefs.view");
  }
  const version = versionParam === undefined ? null : Number(versionParam);
  if (version !== null && (!Number.isInteger(version) || version < 1)) throw data("No such version of this brief.", { status: 404 });
  const found = await briefVersion(brief.id, version);
  if (!found) throw data("No such version of this brief.", { status: 404 });
  const [program] = await db.select({ name: schema.programs.name }).from(schema.programs).where(eq(schema.programs.id, brief.programId));
  return { brief, version: found, programName: program?.name ?? "" };
}

/** Units for the reader: ?units= wins, then the signed-in reader's preference, then SI. */
export async function readerUnits(request: Request): Promise<UnitSystem> {
  const asked = new URL(request.url).searchParams.get("units");
  if (asked === "us" || asked === "si") return asked;
  const session = await getSession(request);
  return session?.user.unitSystem ?? "si";
}
