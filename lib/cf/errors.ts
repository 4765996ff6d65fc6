export type CfErrorCode = "invalid_model" | "limit_exceeded" | "not_applicable" | "no_moment";

export interface CfIssue {
  /** JSON pointer (RFC 6901) into the model, e.g. "/sum/2/of/sigma" ("" = the whole model). */
  pointer: string;
  /** a sentence a person can act on */
  detail: string;
}

/** The one error type thrown by lib/cf; `issues` lists every problem found (the first is `pointer`/`detail`). */
export class CfError extends Error {
  readonly code: CfErrorCode;
  readonly pointer: string;
  readonly detail: string;
  readonly issues: CfIssue[];

  constructor(code: CfErrorCode, pointer: string, detail: string, issues?: CfIssue[]) {
    super(pointer ? `${detail} (at ${pointer})` : detail);
    this.name = "CfError";
    this.code = code;
    this.pointer = pointer;
    this.detail = detail;
    this.issues = issues && issues.length > 0 ? issues : [{ pointer, detail }];
  }
}

/** RFC 6901 pointer from path segments ("~" and "/" escaped). */
export function toPointer(path: readonly (string | number)[]): string {
  return path.map((s) => "/" + String(s).replace(/~/g, "~0").replace(/\//g, "~1")).join("");
}

export function isCfError(e: unknown): e is CfError {
  return e instanceof CfError;
}
