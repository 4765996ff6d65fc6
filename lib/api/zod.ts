import { extendZodWithOpenApi } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";

// Adds .openapi() to zod schemas; imported by every API schema module before use.
extendZodWithOpenApi(z);

export { z };
