// POST /api/bench/echo: parses a small JSON body and answers it, with no key, limit or metering: the
// framework's own ceiling for `npm run bench:http`. Served only when SUMFOLD_BENCH=1.
export const dynamic = "force-dynamic";

export async function POST(req: Request) {
  if (process.env.SUMFOLD_BENCH !== "1") return new Response(null, { status: 404 });
  const body = await req.json();
  return Response.json({ ok: true, echo: body });
}
