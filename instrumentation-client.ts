import { z } from "zod";

// Runs in the browser before any page code (Next.js convention). zod would probe `new Function` for its fast
// path the first time a schema is built; the pages' CSP forbids eval and reports that probe as a violation, so
// every browser copy of zod runs without it (the server keeps the fast path).
z.config({ jitless: true });
