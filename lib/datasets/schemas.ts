import { z } from "zod";

// The upload form's fields (sent as the query string beside the raw file body) and the edit form, shared by
// the browser and the handlers. No database or Node imports: the portal page bundles this.

const text = (max: number, what: string) => z.string().trim().max(max, { error: `Use at most ${max} characters for the ${what}.` });

export const uploadQuerySchema = z.object({
  name: z.string().trim().min(1, { error: "Name the dataset, e.g. “Motor claims 2025”." }).max(160, { error: "Use at most 160 characters." }).optional(),
  description: text(2000, "description").optional(),
  fileName: text(255, "file name").optional(),
  format: z.enum(["auto", "csv", "tsv", "list", "xlsx"]).default("auto"),
  delimiter: z.enum([",", ";", "\t", "|"]).optional(),
  header: z.enum(["auto", "yes", "no"]).default("auto"),
  decimal: z.enum(["auto", "dot", "comma"]).default("auto"),
  /** the worksheet of an Excel workbook (default: the first) */
  sheet: text(120, "sheet name").optional(),
  column: text(255, "column").optional(),
  weights: text(255, "weights column").optional(),
  onInvalid: z.enum(["fail", "skip"]).default("fail"),
  /** a client-chosen id under which the parsing progress can be polled */
  uploadId: z.string().regex(/^[A-Za-z0-9_-]{8,64}$/, { error: "uploadId: 8 to 64 letters, digits, - or _." }).optional(),
});
export type UploadQuery = z.infer<typeof uploadQuerySchema>;

export const datasetEditSchema = z
  .object({
    name: z.string().trim().min(1, { error: "A dataset needs a name." }).max(160, { error: "Use at most 160 characters." }).optional(),
    description: text(2000, "description").optional(),
  })
  .refine((v) => v.name !== undefined || v.description !== undefined, { error: "Send a new name or description." });

/** The public id of a dataset: "ds_" and 16 base-32 characters. */
export const DATASET_ID = /^ds_[0-9a-hjkmnp-tv-z]{16}$/;
