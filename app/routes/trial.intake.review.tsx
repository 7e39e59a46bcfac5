import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { IntakeError } from "~/.server/intake/errors";
import { notifyCommitted } from "~/.server/intake/notify";
import { DELIMITER_LABELS } from "~/.server/intake/parse";
import { commitUpload, discardUpload, reviewUpload, saveColumnMapping } from "~/.server/intake/uploads";
import { FormMessage, SubmitButton, buttonClass } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { MessageBlock, RowMessages } from "~/components/intake-messages";
import { Caution, CheckboxField } from "~/components/more-fields";
import { Pager, Section } from "~/components/page";
import { formatNumber } from "~/format";
import type { Route } from "./+types/trial.intake.review";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Review ${data?.upload.filename ?? "upload"} · Tilthmark` }];

const PAGE_SIZE = 50;

/** Derived columns shown in review, per kind: [key, label, decimals]. */
const DERIVED_COLUMNS: Record<string, [string, string, number][]> = {
  loi: [
    ["loi", "LOI %", 2],
    ["som", "SOM %", 2],
    ["soc", "SOC %", 2],
  ],
  bd: [
    ["bd", "BD g/cm³", 3],
    ["bd_fine", "BD fine g/cm³", 3],
    ["moisture", "Moisture % (dry basis)", 1],
  ],
};

async function load(request: Request, trialId: string, uploadId: string) {
  const member = await requirePermission(request, { trialId }, "measurements.upload");
  try {
    return { member, review: await reviewUpload(trialId, member.programId, uploadId) };
  } catch (error) {
    if (error instanceof IntakeError && error.status === 404) notFound(request, error.message);
    throw error;
  }
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { review } = await load(request, params.trialId, params.uploadId);
  const url = new URL(request.url);
  const problemsOnly = url.searchParams.get("show") === "problems";
  const rows = review.review ? (problemsOnly ? review.review.rows.filter((r) => r.status !== "ok") : review.review.rows) : [];
  const pages = Math.max(1, Math.ceil(rows.length / PAGE_SIZE));
  const page = Math.min(pages, Math.max(1, Number(url.searchParams.get("page")) || 1));
  const numberFields = review.kind.fields.filter((f) => f.type === "number");
  return {
    trialId: params.trialId,
    upload: review.upload,
    kind: { id: review.kind.id, label: review.kind.label },
    options: { delimiter: DELIMITER_LABELS[review.options.delimiter], decimalComma: review.options.decimalComma, hadBom: review.options.hadBom, mappingRemembered: review.options.mappingRemembered ?? false },
    headers: review.options.headers,
    mapping: review.options.mapping,
    fields: review.kind.fields.map((f) => ({ key: f.key, label: f.label, header: f.header, required: f.required })),
    missing: review.missing,
    counts: review.review?.counts ?? null,
    problemsOnly,
    page,
    pages,
    total: rows.length,
    inputColumns: numberFields.map((f) => ({ key: f.key, label: f.label })),
    derivedColumns: DERIVED_COLUMNS[review.kind.id] ?? [["value", review.kind.label, 2]],
    rows: rows.slice((page - 1) * PAGE_SIZE, page * PAGE_SIZE),
  };
}

const Intent = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("commit"), confirmWarnings: z.literal("on").optional() }),
    z.object({ intent: z.literal("discard") }),
    z.object({ intent: z.literal("map") }).loose(),
  ],
  { error: "Unknown action." },
);

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  const form = await readForm(request);
  const parsed = parseForm(form, Intent);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  const { trialId, uploadId } = params;
  try {
    if (input.intent === "discard") {
      await discardUpload(trialId, member.programId, member.user.id, uploadId);
      return redirect(`/trials/${trialId}/intake`);
    }
    if (input.intent === "map") {
      const chosen = Object.fromEntries([...form].filter(([k, v]) => k.startsWith("field:") && typeof v === "string").map(([k, v]) => [k.slice(6), String(v)]));
      const saved = await saveColumnMapping(trialId, member.programId, member.user.id, uploadId, chosen);
      if (!saved.ok) return invalid(Object.fromEntries(Object.entries(saved.errors).map(([k, v]) => [`field:${k}`, v])), { intent: "map", ...chosen });
      return { ok: "Columns mapped and remembered for files with the same headers. The rows are checked below." };
    }
    const committed = await commitUpload(trialId, member.programId, member.user.id, uploadId, { confirmWarnings: input.confirmWarnings === "on" });
    let mailed = "mailed";
    try {
      await notifyCommitted(trialId, committed, member.user.name);
    } catch (error) {
      console.error("[intake] commit notice not sent:", (error as Error).message);
      mailed = "mail-failed";
    }
    const where = committed.eventId ? `event=${committed.eventId}&` : "";
    return redirect(`/trials/${trialId}/data?${where}committed=${committed.uploadId}&notice=${mailed}`);
  } catch (error) {
    if (error instanceof IntakeError) {
      return invalid(error.field ? { [error.field]: [error.message] } : {}, { intent: input.intent }, error.message);
    }
    throw error;
  }
}

function pageLink(trialId: string, uploadId: string, page: number, problemsOnly: boolean) {
  const q = new URLSearchParams();
  if (problemsOnly) q.set("show", "problems");
  if (page > 1) q.set("page", String(page));
  const s = q.toString();
  return `/trials/${trialId}/intake/${uploadId}${s ? `?${s}` : ""}`;
}

const statusStyle = {
  ok: "bg-moss-100 text-moss-900",
  warning: "bg-clay-100 text-clay-800",
  error: "bg-brick-50 text-brick-700 border border-brick-700/40",
} as const;

export default function ReviewPage() {
  const d = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { ok, message } = outcomeOf(result);
  const map = formState(result, "map");
  const commit = formState(result, "commit");
  const { upload, counts } = d;
  const waiting = upload.status === "received";
  return (
    <>
      <p className="mb-4 text-sm">
        <Link to={`/trials/${d.trialId}/intake`}>← Lab intake</Link>
      </p>
      <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
        <div>
          <h2 className="text-2xl font-semibold">{upload.filename}</h2>
          <p className="text-sm text-loam-700">
            {d.kind.label} · uploaded by {upload.uploadedBy} · <span className="num">{(upload.sizeBytes / 1024).toFixed(1)}</span> KB ·{" "}
            {d.options.delimiter}-separated{d.options.decimalComma && ", decimal comma"}
            {d.options.hadBom && ", with byte-order mark"} · SHA-256 <span className="num">{upload.sha256.slice(0, 12)}…</span> ·{" "}
            <a href={`/api/trials/${d.trialId}/uploads/${upload.id}/original`}>original file</a>
          </p>
        </div>
        {!waiting && (
          <p className={`rounded px-3 py-1 text-sm ${upload.status === "committed" ? "bg-moss-100 text-moss-900" : "bg-loam-100"}`}>
            {upload.status === "committed" ? `Committed ${new Date(upload.committedAt!).toISOString().slice(0, 16).replace("T", " ")} UTC` : "Discarded: nothing from it was stored in the trial."}
          </p>
        )}
      </div>
      <div aria-live="polite" className="mb-6 space-y-2 empty:hidden">
        {ok && <FormMessage tone="success">{ok}</FormMessage>}
        {message && <FormMessage>{message}</FormMessage>}
      </div>
      {d.kind.id === "loi" && waiting && (
        <div className="mb-6">
          <Caution title="At the furnace">
            <p>Muffle furnaces run at 550 °C: tongs and heat-resistant gloves, and let crucibles cool in a desiccator before the last weighing.</p>
          </Caution>
        </div>
      )}

      {waiting && d.missing.length > 0 && (
        <Section title="Which column is which?">
          <p className="mb-4 max-w-3xl text-sm text-loam-800">
            The file's headings differ from Tilthmark's template. Choose the column for each value once; Tilthmark remembers the choice for this program, so the next file with the same headings goes straight to checking.
          </p>
          <Form method="post" className="grid max-w-3xl gap-4 sm:grid-cols-2" noValidate>
            {d.fields.map((f) => {
              const error = map.errors?.[`field:${f.key}`]?.[0];
              const id = `map-${f.key}`;
              const current = map.values?.[f.key] ?? (d.mapping[f.key] !== undefined ? String(d.mapping[f.key]) : "");
              return (
                <div key={f.key} className="flex flex-col gap-1">
                  <label htmlFor={id} className="text-sm font-medium">
                    {f.label}
                    {f.required ? "" : " (optional)"}
                  </label>
                  <select id={id} name={`field:${f.key}`} defaultValue={current} aria-invalid={error ? true : undefined} aria-describedby={error ? `${id}-error` : undefined} className={`rounded-md border bg-white px-3 py-2 ${error ? "border-brick-700" : "border-loam-400"}`}>
                    <option value="">— not in this file —</option>
                    {d.headers.map((h, i) => (
                      <option key={i} value={i}>
                        {h || `(column ${i + 1}, no heading)`}
                      </option>
                    ))}
                  </select>
                  {error && (
                    <p id={`${id}-error`} className="text-sm font-medium text-brick-700">
                      {error}
                    </p>
                  )}
                </div>
              );
            })}
            <div className="sm:col-span-2">
              <SubmitButton name="intent" value="map" pendingLabel="Checking…">
                Use these columns
              </SubmitButton>
            </div>
          </Form>
        </Section>
      )}

      {counts && (
        <>
          <div className="mb-6 flex flex-wrap items-center gap-3" role="status">
            <span className="num rounded bg-moss-100 px-2 py-1 text-sm text-moss-900">{counts.ok} ok</span>
            <span className="num rounded bg-clay-100 px-2 py-1 text-sm text-clay-800">{counts.warning} with warnings</span>
            <span className="num rounded border border-brick-700/40 bg-brick-50 px-2 py-1 text-sm text-brick-700">{counts.error} with errors</span>
            <span className="ml-auto flex gap-2 text-sm">
              <Link to={pageLink(d.trialId, upload.id, 1, false)} aria-current={!d.problemsOnly ? "page" : undefined} className={!d.problemsOnly ? "font-semibold" : ""}>
                All rows
              </Link>
              <span aria-hidden>·</span>
              <Link to={pageLink(d.trialId, upload.id, 1, true)} aria-current={d.problemsOnly ? "page" : undefined} className={d.problemsOnly ? "font-semibold" : ""}>
                Errors and warnings only
              </Link>
            </span>
          </div>

          {waiting && (
            <div className="mb-6 rounded-lg border border-loam-200 bg-white p-4">
              {counts.error > 0 ? (
                <p className="text-sm text-brick-700" role="alert">
                  <strong>Nothing can be committed yet:</strong> {counts.error} row{counts.error === 1 ? " has" : "s have"} errors. Fix them in the file (each message says how) and upload it again; this upload will be set aside.
                </p>
              ) : (
                <Form method="post" className="flex flex-wrap items-center gap-4" noValidate>
                  {counts.warning > 0 && (
                    <CheckboxField label={`I checked the ${counts.warning} row${counts.warning === 1 ? "" : "s"} with warnings`} name="confirmWarnings" errors={commit.errors} />
                  )}
                  <SubmitButton name="intent" value="commit" pendingLabel="Committing…">
                    Commit {counts.ok + counts.warning} rows
                  </SubmitButton>
                  <span className="text-sm text-loam-700">All rows go in together, or none do.</span>
                </Form>
              )}
              <Form method="post" className="mt-3">
                <SubmitButton name="intent" value="discard" variant="secondary">
                  {counts.error > 0 ? "Set this upload aside" : "Discard this upload"}
                </SubmitButton>
              </Form>
            </div>
          )}

          {/* A container for the messages below: each one is as wide as the visible part of the table, not the whole table. */}
          <div className="@container overflow-x-auto rounded-lg border border-loam-200 bg-white">
            <table className="w-full border-collapse text-left text-sm">
              <caption className="sr-only">Rows of the file with their status</caption>
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-2 py-2 text-right font-medium">Row</th>
                  <th scope="col" className="px-2 py-2 font-medium">Status</th>
                  <th scope="col" className="px-2 py-2 font-medium">Sample</th>
                  <th scope="col" className="px-2 py-2 font-medium">Plot · depth</th>
                  {d.inputColumns.map((c) => (
                    <th key={c.key} scope="col" className="px-2 py-2 text-right font-medium">
                      {c.label}
                    </th>
                  ))}
                  {d.derivedColumns.map(([key, label]) => (
                    <th key={key} scope="col" className="bg-moss-50 px-2 py-2 text-right font-medium">
                      {label}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {d.rows.length === 0 && (
                  <tr>
                    <td colSpan={4 + d.inputColumns.length + d.derivedColumns.length} className="px-3 py-6 text-center text-loam-700">
                      {d.problemsOnly ? "No errors or warnings: every row is ok." : "No rows."}
                    </td>
                  </tr>
                )}
                {d.rows.flatMap((r) => [
                  <tr key={r.index} className="border-t border-loam-200" data-row={r.rowNumber}>
                    <td className="num px-2 py-1.5 text-right">{r.rowNumber}</td>
                    <td className="px-2 py-1.5">
                      <span className={`rounded px-1.5 py-0.5 text-xs ${statusStyle[r.status]}`}>{r.status}</span>
                    </td>
                    <td className="num px-2 py-1.5 whitespace-nowrap">{r.sampleCode || "—"}</td>
                    <td className="num px-2 py-1.5 whitespace-nowrap">{r.plotNumber ? `${r.plotNumber} · ${r.depth}` : "—"}</td>
                    {d.inputColumns.map((c) => (
                      <td key={c.key} className="num px-2 py-1.5 text-right">
                        {r.inputs[c.key] ?? ""}
                      </td>
                    ))}
                    {d.derivedColumns.map(([key, , digits]) => (
                      <td key={key} className="num bg-moss-50/50 px-2 py-1.5 text-right">
                        {formatNumber(r.derived[key], digits)}
                      </td>
                    ))}
                  </tr>,
                  r.messages.length > 0 && (
                    <tr key={`${r.index}-m`} className={r.status === "error" ? "bg-brick-50/60" : "bg-clay-100/40"}>
                      <td colSpan={4 + d.inputColumns.length + d.derivedColumns.length} className="p-0">
                        <MessageBlock>
                          <RowMessages
                            rowLabel={
                              <>
                                row <span className="num">{r.rowNumber}</span>
                              </>
                            }
                            messages={r.messages}
                          />
                        </MessageBlock>
                      </td>
                    </tr>
                  ),
                ])}
              </tbody>
            </table>
          </div>
          <Pager
            page={d.page}
            pages={d.pages}
            href={(p) => pageLink(d.trialId, upload.id, p, d.problemsOnly)}
            note={
              <>
                {" "}
                (<span className="num">{d.total}</span> rows)
              </>
            }
          />
        </>
      )}
      {!waiting && !counts && d.missing.length === 0 && (
        <p className="text-loam-700">
          {upload.status === "committed" ? (
            <>
              Its <span className="num">{upload.rowCount}</span> rows are in the trial: see them under <Link to={`/trials/${d.trialId}/data`}>Data</Link>.
            </>
          ) : (
            <>
              This upload was set aside. <Link to={`/trials/${d.trialId}/intake`} className={buttonClass("secondary")}>Upload a corrected file</Link>
            </>
          )}
        </p>
      )}
    </>
  );
}
