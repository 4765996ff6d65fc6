import type { CfErrorCode, CfIssue } from "@/lib/cf/errors";
import type { FieldError, ProblemCode } from "@/lib/api/errors";

/** The computations the pool runs, named as their endpoints. */
export const OPERATIONS = ["cf", "density", "quantiles", "moments", "convolve", "risk"] as const;
export type OperationName = (typeof OPERATIONS)[number];

export interface ComputeTask {
  op: OperationName;
  /** a validated request body, datasets already resolved */
  body: unknown;
  /** the cooperative deadline, counted from when a worker starts the task */
  budgetMs: number;
}

export type ComputeError =
  | { kind: "deadline"; stage: string; checks: number }
  | { kind: "api"; code: ProblemCode; detail: string; errors?: FieldError[]; extra: Record<string, unknown> }
  | { kind: "cf"; code: CfErrorCode; pointer: string; detail: string; issues: CfIssue[] }
  | { kind: "internal"; message: string; progress: { checks: number; stage: string } };

export type ComputeOutcome =
  | { ok: true; result: Record<string, unknown>; computeMs: number }
  | { ok: false; error: ComputeError; computeMs: number };
