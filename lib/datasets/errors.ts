/** Why a file could not be turned into a dataset; every message says what to change in the file or the form. */
export type DatasetErrorCode =
  | "empty"
  | "binary"
  | "no_data"
  | "column_not_found"
  | "column_ambiguous"
  | "bad_values"
  | "wrong_delimiter"
  | "field_count"
  | "unclosed_quote"
  | "stray_quote"
  | "too_many_values"
  | "too_large"
  | "weights";

export interface DatasetErrorDetail {
  /** 1-based line of the first problem in the file, when there is one */
  line?: number;
  /** 1-based column (field) of the first problem */
  column?: number;
  /** the offending cell as written, cut to 40 characters */
  value?: string;
  /** counts of the cells or rows behind the message, by reason */
  counts?: Record<string, number>;
}

export class DatasetParseError extends Error {
  constructor(
    readonly code: DatasetErrorCode,
    message: string,
    readonly detail: DatasetErrorDetail = {},
  ) {
    super(message);
    this.name = "DatasetParseError";
  }
}

export const isDatasetParseError = (e: unknown): e is DatasetParseError => e instanceof DatasetParseError;

/** A cell quoted for a message: trimmed to 40 characters, control characters made visible. */
export function showCell(s: string): string {
  const t = s.length > 40 ? `${s.slice(0, 37)}...` : s;
  return JSON.stringify(t);
}
