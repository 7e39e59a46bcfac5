// Reads a multipart form with a hard size cap. The whole body is drained even when too large, so
// the browser gets the message instead of a reset connection.
import { readForm } from "../forms";
import { IntakeError } from "./errors";
import { MAX_UPLOAD_BYTES, tooLargeMessage } from "./parse";

/** Room for the form's other fields and the multipart framing around the file. */
const FORM_OVERHEAD_BYTES = 64 * 1024;

export async function readUploadForm(request: Request): Promise<FormData> {
  const limit = MAX_UPLOAD_BYTES + FORM_OVERHEAD_BYTES;
  if (!request.body) return readForm(request);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.length;
    if (total <= limit) chunks.push(value);
    else chunks.length = 0;
  }
  if (total > limit) throw new IntakeError(tooLargeMessage(total - FORM_OVERHEAD_BYTES), "file", 413);
  const headers = new Headers(request.headers);
  headers.delete("content-length");
  return readForm(new Request(request.url, { method: "POST", headers, body: Buffer.concat(chunks) }));
}
