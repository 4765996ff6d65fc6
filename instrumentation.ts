// Runs once when the Next.js server starts: the portal's schedules, usage flushed on shutdown, any spool of a
// previous run replayed.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { flushUsage } = await import("./lib/api/metering");
  // Quota e-mails after each metering flush, and the hourly scan for keys about to expire.
  (await import("./lib/portal/schedule")).startPortalSchedules();
  // Billing: period close and the dunning sweep, every minute.
  (await import("./lib/billing/schedule")).startBillingSchedule();
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    try {
      // In-flight computations are stopped (their requests answer 503 and are metered), then usage is written.
      const stopped = await (await import("./lib/compute/pool")).stopCompute();
      if (stopped > 0) await new Promise((r) => setTimeout(r, 50));
      await flushUsage();
    } finally {
      console.log(`[sumfold] usage flushed on ${signal}; exiting`);
      process.exit(0);
    }
  };
  // NEXT_MANUAL_SIG_HANDLE=true (set by the start and test commands) leaves signals to us.
  process.on("SIGTERM", () => void stop("SIGTERM"));
  process.on("SIGINT", () => void stop("SIGINT"));
  void flushUsage().catch(() => {});
  // The compute threads start with the server and warm the engine's code paths before the first requests.
  void (await import("./lib/compute/pool")).startCompute().then((r) => {
    const failed = r.flatMap((t) => t.failed);
    if (failed.length) console.warn(`[sumfold] compute warm-up: ${failed.length} call(s) failed: ${failed.join("; ")}`);
  });
}
