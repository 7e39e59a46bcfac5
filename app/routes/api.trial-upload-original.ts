import { requirePermission } from "~/.server/permissions";
import { IntakeError } from "~/.server/intake/errors";
import { originalFile } from "~/.server/intake/uploads";
import { data } from "react-router";
import type { Route } from "./+types/api.trial-upload-original";

/** The uploaded file byte for byte, with its SHA-256 in a header so anyone can check it. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  try {
    const file = await originalFile(params.trialId, params.uploadId);
    return new Response(new Uint8Array(file.content), {
      headers: {
        "content-type": "application/octet-stream",
        "content-disposition": `attachment; filename="${file.filename.replace(/[^A-Za-z0-9._-]+/g, "-")}"`,
        "x-content-sha256": file.sha256,
        "cache-control": "private, no-store",
      },
    });
  } catch (error) {
    if (error instanceof IntakeError) throw data({ error: error.message }, { status: error.status });
    throw error;
  }
}
