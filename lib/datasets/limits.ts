/** Limits of an upload: the raw file and the number of values kept. */
export const MAX_UPLOAD_BYTES = 50 * 1024 * 1024;
export const MAX_VALUES = 1_000_000;
/** How much of the file's start the delimiter and header are guessed from. */
export const SNIFF_BYTES = 64 * 1024;
/** Binary chunks stored per row: below InnoDB's per-row BLOB share of the redo log and max_allowed_packet. */
export const CHUNK_BYTES = 1024 * 1024;
/** Uploads parsed at once per server process; each holds up to ~3x its file size in memory (see scripts/bench-upload.ts). */
export const MAX_CONCURRENT_UPLOADS = 4;
