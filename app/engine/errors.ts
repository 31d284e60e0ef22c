/** Codes for every input problem the engine reports. The message always names the problem concretely. */
export type EngineErrorCode =
  | "not_text"
  | "no_header"
  | "unknown_unit"
  | "column_missing"
  | "column_not_numeric"
  | "bad_map"
  | "bad_car"
  | "bad_options"
  | "too_few_rows"
  | "time_not_increasing"
  | "bad_quote";

/** An input problem the user can fix. The CLI prints `error: <message>` and exits 2. */
export class EngineError extends Error {
  readonly code: EngineErrorCode;
  constructor(code: EngineErrorCode, message: string) {
    super(message);
    this.name = "EngineError";
    this.code = code;
  }
}

export function isEngineError(e: unknown): e is EngineError {
  return e instanceof EngineError;
}

/**
 * Not an input problem: a log part cannot be analysed on its own (a quoted cell, too short a
 * lead-in, an input error whose line number only a whole-log run can give). The caller analyses
 * the log whole instead, which gives the same summary or the exact error.
 */
export class PartUnsafe extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PartUnsafe";
  }
}
