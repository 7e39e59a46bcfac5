import { useState } from "react";
import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { invalid } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { consumeAttempt } from "~/.server/rate-limit";
import { kindsOf } from "~/.server/intake/context";
import { IntakeError } from "~/.server/intake/errors";
import { listEvents } from "~/.server/intake/events";
import { readUploadForm } from "~/.server/intake/multipart";
import { MAX_UPLOAD_BYTES, type Delimiter } from "~/.server/intake/parse";
import { listUploads, receiveUpload } from "~/.server/intake/uploads";
import { FormMessage, SelectField, SubmitButton, buttonClass } from "~/components/form";
import { formState } from "~/components/form-state";
import { Caution, CheckboxField } from "~/components/more-fields";
import { Empty, Section } from "~/components/page";
import type { Route } from "./+types/trial.intake";

export const meta: Route.MetaFunction = () => [{ title: "Lab intake · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  const [events, uploads, { kinds }] = await Promise.all([listEvents(params.trialId), listUploads(params.trialId), kindsOf(member.programId)]);
  return {
    trialId: params.trialId,
    maxBytes: MAX_UPLOAD_BYTES,
    events: events.map((e) => ({ id: e.id, code: e.code, season: e.season, eventDate: e.eventDate, variables: e.variables, measured: e.measured, sampleCount: e.sampleCount })),
    kinds: kinds.map((k) => ({ id: k.id, label: k.label, summary: k.summary })),
    uploads,
  };
}

const DELIMITERS: Record<string, Delimiter | undefined> = { auto: undefined, comma: ",", semicolon: ";", tab: "\t" };

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  // Counted before the body is read, so a flood of files costs no parsing.
  const limited = await consumeAttempt("upload", member.user.id);
  if (limited) return invalid({ file: [limited] }, {});
  let form: FormData;
  try {
    form = await readUploadForm(request);
  } catch (error) {
    if (error instanceof IntakeError) return invalid({ file: [error.message] }, {});
    throw error;
  }
  const values = { kind: String(form.get("kind") ?? ""), delimiter: String(form.get("delimiter") ?? "auto"), decimalComma: form.get("decimalComma") === "on" ? "on" : "" };
  const file = form.get("file");
  if (!(file instanceof File) || file.name === "") return invalid({ file: ["Choose the CSV file to upload."] }, values);
  if (!(values.delimiter in DELIMITERS)) return invalid({ delimiter: ["Choose how the columns are separated."] }, values);
  try {
    const { uploadId } = await receiveUpload({
      trialId: params.trialId,
      programId: member.programId,
      actorId: member.user.id,
      kind: values.kind,
      filename: file.name,
      contentType: file.type || null,
      bytes: new Uint8Array(await file.arrayBuffer()),
      delimiter: DELIMITERS[values.delimiter],
      decimalComma: values.decimalComma === "on",
    });
    return redirect(`/trials/${params.trialId}/intake/${uploadId}`);
  } catch (error) {
    if (error instanceof IntakeError) return invalid({ [error.field ?? "file"]: [error.message] }, values);
    throw error;
  }
}

const statusLabel = { received: "waiting for review", committed: "committed", discarded: "discarded" } as const;

export default function IntakePage() {
  const { trialId, maxBytes, events, kinds, uploads } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { errors, values } = formState(result);
  const [sizeProblem, setSizeProblem] = useState<string | null>(null);
  const fileError = sizeProblem ?? errors?.file?.[0];
  return (
    <>
      <div className="mb-8">
        <Caution title="At the furnace">
          <p>Muffle furnaces run at 550 °C and crucibles stay hot long after: use tongs and heat-resistant gloves, and let crucibles cool in a desiccator before weighing.</p>
        </Caution>
      </div>
      <div className="grid grid-cols-1 gap-10 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0">
          <Section title="Upload lab results">
            <Form method="post" encType="multipart/form-data" className="flex flex-col gap-4 rounded-lg border border-loam-200 bg-white p-4" noValidate>
              <SelectField
                label="What the file holds"
                name="kind"
                options={kinds.map((k) => ({ value: k.id, label: k.label }))}
                defaultValue={values?.kind}
                errors={errors}
              />
              <div className="flex flex-col gap-1">
                <label htmlFor="field-file" className="text-sm font-medium text-loam-900">
                  CSV file (up to 20 MB)
                </label>
                <input
                  id="field-file"
                  name="file"
                  type="file"
                  accept=".csv,.txt,.tsv,text/csv,text/plain"
                  required
                  aria-invalid={fileError ? true : undefined}
                  aria-describedby={fileError ? "field-file-error" : "field-file-hint"}
                  onChange={(e) => {
                    const f = e.currentTarget.files?.[0];
                    setSizeProblem(f && f.size > maxBytes ? `The file is ${(f.size / 1024 / 1024).toFixed(1)} MB; lab intake takes files up to 20 MB. Split it into several files (for example one per sampling event).` : null);
                  }}
                  className="w-full min-w-0 rounded-md border border-loam-400 bg-white px-3 py-2 text-base file:mr-3 file:rounded file:border-0 file:bg-loam-100 file:px-3 file:py-1"
                />
                <p id="field-file-hint" className="text-sm text-loam-600">
                  UTF-8 text (“CSV UTF-8” in spreadsheets), with or without a byte-order mark. Nothing is stored in the trial until you review and commit.
                </p>
                {fileError && (
                  <p id="field-file-error" role="alert" className="text-sm font-medium text-brick-700">
                    {fileError}
                  </p>
                )}
              </div>
              <div className="grid gap-4 sm:grid-cols-2">
                <SelectField
                  label="Columns separated by"
                  name="delimiter"
                  options={[
                    { value: "auto", label: "Detect (comma, semicolon or tab)" },
                    { value: "comma", label: "Comma" },
                    { value: "semicolon", label: "Semicolon" },
                    { value: "tab", label: "Tab" },
                  ]}
                  defaultValue={values?.delimiter ?? "auto"}
                  errors={errors}
                />
                <div className="pt-6">
                  <CheckboxField label="Numbers use a decimal comma (12,5)" name="decimalComma" defaultChecked={values?.decimalComma === "on"} errors={errors} />
                </div>
              </div>
              <div>
                <SubmitButton pendingLabel="Reading the file…">Upload and check</SubmitButton>
              </div>
            </Form>
          </Section>
          <Section title="Recent uploads">
            {uploads.length === 0 ? (
              <Empty>No files uploaded yet.</Empty>
            ) : (
              <ul className="divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white text-sm">
                {uploads.map((u) => (
                  <li key={u.id} className="flex flex-wrap items-baseline gap-x-3 gap-y-1 px-4 py-2">
                    <Link to={`/trials/${trialId}/intake/${u.id}`} className="font-medium">
                      {u.filename}
                    </Link>
                    <span className="text-loam-700">
                      {u.kind.toUpperCase()} · <span className="num">{u.rowCount ?? 0}</span> rows · {u.uploadedBy} ·{" "}
                      <span className="num">{new Date(u.uploadedAt).toISOString().slice(0, 16).replace("T", " ")}</span> UTC
                    </span>
                    <span className={`rounded px-1.5 py-0.5 text-xs ${u.status === "committed" ? "bg-moss-100 text-moss-900" : u.status === "received" ? "bg-clay-100 text-clay-800" : "bg-loam-100 text-loam-700"}`}>
                      {statusLabel[u.status]}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </Section>
        </div>
        <aside className="min-w-0">
          <Section title="Templates">
            <p className="mb-3 text-sm text-loam-700">
              Each template lists the event's sample codes with Tilthmark's column names. Fill in the lab's numbers and upload it as it is.
            </p>
            {events.length === 0 ? (
              <Empty>
                No sampling events yet. <Link to={`/trials/${trialId}/sampling`}>Create one</Link> to get sample codes.
              </Empty>
            ) : (
              <ul className="divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white text-sm">
                {events.map((e) => (
                  <li key={e.id} className="px-4 py-2">
                    <p className="font-medium">
                      <span className="num">{e.code}</span> {e.season} <span className="num font-normal text-loam-600">{e.eventDate}</span>
                    </p>
                    <p className="mt-1 flex flex-wrap gap-2">
                      {kinds
                        .filter((k) => e.variables.includes(k.id))
                        .map((k) => (
                          <a key={k.id} className={buttonClass("secondary")} href={`/api/trials/${trialId}/template.csv?event=${e.id}&kind=${k.id}`} download>
                            {k.id.toUpperCase()} template
                          </a>
                        ))}
                      <Link className={buttonClass("secondary")} to={`/trials/${trialId}/intake/entry?event=${e.id}`}>
                        Enter by hand
                      </Link>
                    </p>
                  </li>
                ))}
              </ul>
            )}
          </Section>
          <Section title="What the checks look for">
            <ul className="list-disc space-y-1 pl-5 text-sm text-loam-800">
              <li>Errors stop the commit: unknown or repeated sample codes, text or negative numbers in mass columns, ash heavier than the dry soil, a missing depth increment in a plot.</li>
              <li>Warnings need your confirmation: bulk density outside 0.5–2.0 g/cm³, LOI above 40 %, a value far from the others of its event and depth.</li>
              <li>A file is committed whole or not at all, and kept byte for byte.</li>
            </ul>
          </Section>
        </aside>
      </div>
    </>
  );
}
