// POST /api/v1/convolve: convolve tabulated lattice laws (and take n-fold powers) by FFT.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { ConvolveRequest } from "@/lib/api/schemas/convolve";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body, compute }) => compute("convolve", body), {
  endpoint: "POST /api/v1/convolve",
  scope: "lattice",
  schema: ConvolveRequest,
  modelPointer: "",
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
