/** A request the data does not allow (e.g. a used invitation): the caller's to fix, never a server fault. */
export class RecordInputError extends Error {
  readonly kind = "input" as const;
  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
  }
}
