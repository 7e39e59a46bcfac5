/** A design change Tilthmark refuses, with a sentence for the page; `field` points at the form field at fault. */
export class DesignError extends Error {
  readonly field: string | undefined;
  constructor(message: string, field?: string) {
    super(message);
    this.name = "DesignError";
    this.field = field;
  }
}

/** Turns a refusal into the field-keyed errors the forms show. */
export function designErrors(error: DesignError): Record<string, string[]> {
  return error.field ? { [error.field]: [error.message] } : {};
}
