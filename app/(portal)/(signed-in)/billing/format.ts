export const money = (minor: number, currency = "GBP") => new Intl.NumberFormat("en-GB", { style: "currency", currency }).format(minor / 100);
export const units = (n: number) => n.toLocaleString("en-GB");
export const day = (iso: string) => new Date(iso).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });
/** The last day of a period [start, end). */
export const lastDay = (endIso: string) => day(new Date(new Date(endIso).getTime() - 1).toISOString());
export const STATUS_LABEL: Record<string, string> = { open: "Open", paid: "Paid", void: "Void", draft: "Draft" };
