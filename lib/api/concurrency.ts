import { ApiError } from "./errors";

/**
 * Per-caller cap on computations running or waiting for a compute thread at once, in this server instance (a key
 * or an explorer user; the cap comes from the plan). Past it the request answers 429 `too_many_concurrent`.
 */
const g = globalThis as unknown as { __sumfoldSlots?: Map<string, number> };
const slots = () => (g.__sumfoldSlots ??= new Map());

export function acquireSlot(who: string, cap: number): () => void {
  const s = slots();
  const n = s.get(who) ?? 0;
  if (n >= cap) {
    throw new ApiError("too_many_concurrent", `This plan allows ${cap} computations at once per caller; one must finish first. Retry shortly, or submit long work as a job.`, {
      headers: { "retry-after": "1" },
    });
  }
  s.set(who, n + 1);
  let released = false;
  return () => {
    if (released) return;
    released = true;
    const m = (s.get(who) ?? 1) - 1;
    if (m <= 0) s.delete(who);
    else s.set(who, m);
  };
}
