/**
 * Compute units follow the work the engine actually did: every computation runs in a worker thread, which
 * measures the time the engine ran (computeMs, excluding any wait for a free thread), and the request is charged
 *   units = max(1, ceil(computeMs / UNIT_MS))
 * after the work. A computation stopped at its deadline is charged the same way for the time it ran. Catalogue
 * calls (families, datasets) cost 1. Before the work, the monthly quota must have at least 1 unit left.
 * The deadline bounds one call's units: at most ceil(deadline / UNIT_MS).
 */
export const UNIT_MS = 10;

export const unitsForWork = (computeMs: number) => Math.max(1, Math.ceil(Math.max(0, computeMs) / UNIT_MS));

/** The largest number of units one computation with this deadline can be charged. */
export const maxUnitsFor = (budgetMs: number) => Math.ceil((budgetMs + 250) / UNIT_MS);
