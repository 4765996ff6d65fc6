// POST /api/portal/datasets/{id}/versions: upload a file as the next version (admins or the owner)
import { requireCaller } from "@/lib/auth/session";
import { handleUpload } from "@/lib/datasets/portal";
import { handler } from "@/lib/portal/http";

export const dynamic = "force-dynamic";

export const POST = handler(async (req, params) => handleUpload(req, await requireCaller(req, ["datasets.upload"]), params.id));
