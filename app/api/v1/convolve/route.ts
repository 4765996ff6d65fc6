// POST /api/v1/convolve: convolve tabulated lattice laws (and take n-fold powers) by FFT.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { runConvolve } from "@/lib/api/operations";
import { toUnits } from "@/lib/api/units";
import { ConvolveRequest } from "./schema";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body }) => runConvolve(body), {
  endpoint: "POST /api/v1/convolve",
  scope: "lattice",
  schema: ConvolveRequest,
  modelPointer: "",
  units: (b) => {
    const power = b.power ?? 1;
    const length = Math.max(2, b.terms.reduce((s, t) => s + t.p.length - 1, 1) * power);
    return toUnits(length * Math.log2(length) * (1 + Math.log2(power)));
  },
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
