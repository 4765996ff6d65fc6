import type { ReactNode } from "react";
import { money, units } from "./format";

export interface Line {
  description: string;
  quantity: number;
  unitLabel: string;
  amountMinor: number;
}

/** The lines of a bill (upcoming or issued): description, quantity, rate and amount; `footer` adds tfoot rows. */
export function LinesTable({ lines, currency, caption, footer }: { lines: Line[]; currency: string; caption?: string; footer?: ReactNode }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm">
        {caption ? <caption className="sr-only">{caption}</caption> : null}
        <thead>
          <tr className="border-b border-paper-line text-left text-ink-soft">
            <th className="py-2 pr-3 font-semibold">Line</th>
            <th className="py-2 pr-3 text-right font-semibold">Quantity</th>
            <th className="py-2 pr-3 font-semibold">Rate</th>
            <th className="py-2 text-right font-semibold">Amount</th>
          </tr>
        </thead>
        <tbody>
          {lines.map((l, i) => (
            <tr key={i} className="border-b border-paper-line/60">
              <td className="py-2 pr-3">{l.description}</td>
              <td className="py-2 pr-3 text-right font-mono tabular-nums">{units(l.quantity)}</td>
              <td className="py-2 pr-3 text-ink-soft">{l.unitLabel}</td>
              <td className="py-2 text-right font-mono tabular-nums">{money(l.amountMinor, currency)}</td>
            </tr>
          ))}
        </tbody>
        {footer ? <tfoot>{footer}</tfoot> : null}
      </table>
    </div>
  );
}
