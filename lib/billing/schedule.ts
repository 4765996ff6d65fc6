import "server-only";
import { closeDuePeriods, sweepDunning } from "./service";

export const BILLING_SWEEP_MS = 60_000;
const g = globalThis as unknown as { __sumfoldBillingSchedule?: NodeJS.Timeout };

/** Every minute: close the billing periods that have ended, and restrict organisations past their grace period. */
export function startBillingSchedule(): void {
  if (g.__sumfoldBillingSchedule || !process.env.STRIPE_SECRET_KEY) return;
  const sweep = async () => {
    try {
      await closeDuePeriods();
      await sweepDunning();
    } catch (e) {
      console.error("[sumfold] billing sweep failed", e);
    }
  };
  g.__sumfoldBillingSchedule = setInterval(() => void sweep(), BILLING_SWEEP_MS);
  g.__sumfoldBillingSchedule.unref();
  void sweep();
}
