// GET /api/portal/billing/invoices/:id/pdf: the invoice as a PDF download
import { requireCaller } from "@/lib/auth/session";
import { invoicePdf } from "@/lib/billing/pdf";
import { getAccount, getInvoice } from "@/lib/billing/service";
import { handler, idParam } from "@/lib/portal/http";

export const GET = handler(async (req, params) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const { invoice, lines } = await getInvoice(caller.organizationId, idParam(params, "id"));
  const acct = await getAccount(caller.organizationId);
  const pdf = await invoicePdf({ invoice, lines, organization: caller.organizationName, account: acct });
  return new Response(Buffer.from(pdf), {
    status: 200,
    headers: { "content-type": "application/pdf", "content-disposition": `attachment; filename="${invoice.number}.pdf"`, "cache-control": "no-store" },
  });
});
