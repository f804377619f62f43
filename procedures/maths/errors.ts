/** Why an input was refused; lets callers map errors onto form fields without parsing messages. */
export type MathsInputReason =
  | 'missing'
  | 'not-a-number'
  | 'not-finite'
  | 'negative'
  | 'zero'
  | 'out-of-range'
  | 'unit'
  | 'unknown-name';

/** Thrown for any bad input; `argument` names the offending argument (e.g. "centreDistance"). */
export class MathsInputError extends Error {
  override readonly name = 'MathsInputError';

  constructor(
    readonly argument: string,
    message: string,
    readonly reason: MathsInputReason,
  ) {
    super(message);
  }
}
