/** A refusal with a sentence for the person, optionally tied to a form field. Nothing was written. */
export class IntakeError extends Error {
  readonly field: string | undefined;
  readonly status: number;
  constructor(message: string, field?: string, status = 400) {
    super(message);
    this.name = "IntakeError";
    this.field = field;
    this.status = status;
  }
}
