import "server-only";
import { PDFDocument, rgb, StandardFonts, type PDFFont, type PDFPage } from "pdf-lib";
import { formatMoney, planOf } from "@/lib/api/plans";
import type { BillingAccount, Invoice, InvoiceLine } from "@/lib/db/schema-billing";
import { periodLabel } from "./money";

export const CAUTION_TEXT =
  "Caution. Sumfold's results are computational aids. Capital, reserving, pricing and safety-tolerance decisions rest with licensed practice and local regulation.";

const INK = rgb(0.09, 0.13, 0.18);
const SOFT = rgb(0.42, 0.47, 0.53);
const FOLD = rgb(0.08, 0.44, 0.39);

// The standard fonts encode WinAnsi only; anything outside it is spelled out.
const winAnsi = (s: string) => s.replace(/→/g, "->").replace(/[^\x20-\x7e\u00a0-\u00ff€–—‘’“”•…]/g, "?");

function wrap(text: string, font: PDFFont, size: number, width: number): string[] {
  const out: string[] = [];
  let line = "";
  for (const word of winAnsi(text).split(/\s+/)) {
    const next = line ? `${line} ${word}` : word;
    if (font.widthOfTextAtSize(next, size) > width && line) {
      out.push(line);
      line = word;
    } else line = next;
  }
  if (line) out.push(line);
  return out;
}

/** The invoice as a one-page (or longer) A4 PDF: who is billed, the period, each line, the total, and the caution. */
export async function invoicePdf(p: { invoice: Invoice; lines: InvoiceLine[]; organization: string; account: BillingAccount }): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Sumfold invoice ${p.invoice.number}`);
  doc.setAuthor("Sumfold");
  doc.setSubject(`Invoice for ${p.organization}`);
  doc.setCreationDate(p.invoice.createdAt);
  const regular = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const W = 595.28;
  const H = 841.89;
  const M = 56;
  let page: PDFPage = doc.addPage([W, H]);
  let y = H - M;
  const text = (s: string, x: number, opts: { size?: number; font?: PDFFont; color?: ReturnType<typeof rgb>; right?: boolean } = {}) => {
    const size = opts.size ?? 10;
    const font = opts.font ?? regular;
    const str = winAnsi(s);
    const dx = opts.right ? x - font.widthOfTextAtSize(str, size) : x;
    page.drawText(str, { x: dx, y, size, font, color: opts.color ?? INK });
  };
  const down = (dy: number) => {
    y -= dy;
    if (y < M + 60) {
      page = doc.addPage([W, H]);
      y = H - M;
    }
  };

  text("Sumfold", M, { size: 22, font: bold, color: FOLD });
  text("INVOICE", W - M, { size: 16, font: bold, right: true });
  down(18);
  text("Distribution of sums, as a service", M, { size: 9, color: SOFT });
  text(p.invoice.number, W - M, { size: 11, right: true });
  down(30);

  const status = p.invoice.status === "paid" ? `Paid ${p.invoice.paidAt?.toISOString().slice(0, 10) ?? ""}` : p.invoice.status === "open" ? "Due: charged to the saved card" : p.invoice.status;
  const meta: [string, string][] = [
    ["Issued", p.invoice.createdAt.toISOString().slice(0, 10)],
    ["Period", periodLabel({ start: p.invoice.periodStart, end: p.invoice.periodEnd })],
    ["Plan", planOf(p.invoice.planCode).label],
    ["Status", status],
    ["Compute units metered", p.invoice.kind === "period" ? p.invoice.unitsMetered.toLocaleString("en-GB") : "-"],
  ];
  const top = y;
  text("Billed to", M, { font: bold });
  down(14);
  for (const l of [p.account.billingName ?? p.organization, ...(p.account.billingAddress ?? "").split(/\r?\n|,\s*/).filter(Boolean), ...(p.account.taxId ? [`Tax id: ${p.account.taxId}`] : [])]) {
    text(l, M);
    down(13);
  }
  const leftEnd = y;
  y = top;
  for (const [k, v] of meta) {
    text(k, 330, { color: SOFT });
    text(v, W - M, { right: true });
    down(14);
  }
  y = Math.min(y, leftEnd) - 20;

  text("Description", M, { font: bold });
  text("Quantity", 390, { font: bold, right: true });
  text("Amount", W - M, { font: bold, right: true });
  down(6);
  page.drawLine({ start: { x: M, y }, end: { x: W - M, y }, thickness: 0.7, color: SOFT });
  down(14);
  for (const l of p.lines) {
    const parts = wrap(l.description, regular, 10, 260);
    text(l.quantity.toLocaleString("en-GB"), 390, { right: true });
    text(formatMoney(l.amountMinor, p.invoice.currency), W - M, { right: true });
    parts.forEach((s, i) => {
      text(s, M);
      if (i < parts.length - 1) down(12);
    });
    down(12);
    text(l.unitLabel, M, { size: 8, color: SOFT });
    down(18);
  }
  page.drawLine({ start: { x: M, y: y + 8 }, end: { x: W - M, y: y + 8 }, thickness: 0.7, color: SOFT });
  down(8);
  text(`Total (${p.invoice.currency})`, 390, { font: bold, right: true, size: 12 });
  text(formatMoney(p.invoice.totalMinor, p.invoice.currency), W - M, { font: bold, right: true, size: 12 });
  down(40);
  for (const s of wrap(CAUTION_TEXT, regular, 9, W - 2 * M)) {
    text(s, M, { size: 9, color: SOFT });
    down(12);
  }
  down(6);
  text("Amounts are in minor-unit precision; units billed are the compute units metered in the period, to the unit.", M, { size: 8, color: SOFT });
  return doc.save();
}
