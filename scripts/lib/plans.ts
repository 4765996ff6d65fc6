import mysql from "mysql2/promise";
import { CURRENCY, PLAN_NAMES, PLANS } from "../../lib/api/plans";

/** Copies the plan catalogue (lib/api/plans.ts, the source) into the `plans` table; rows no longer in code stay. */
export async function syncPlans(databaseUrl: string): Promise<void> {
  const conn = await mysql.createConnection({ uri: databaseUrl });
  try {
    for (const code of PLAN_NAMES) {
      const p = PLANS[code];
      const limits = { requestsPerSecond: p.requestsPerSecond, monthlyUnits: p.monthlyUnits, computeBudgetMs: p.computeBudgetMs, concurrentComputations: p.concurrentComputations, jobBudgetMs: p.jobBudgetMs };
      await conn.execute(
        `INSERT INTO plans (code, label, \`rank\`, currency, monthly_fee_minor, included_units, overage_per_million_minor, requests_per_second, monthly_units, limits)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)
         ON DUPLICATE KEY UPDATE label = VALUES(label), \`rank\` = VALUES(\`rank\`), currency = VALUES(currency), monthly_fee_minor = VALUES(monthly_fee_minor),
           included_units = VALUES(included_units), overage_per_million_minor = VALUES(overage_per_million_minor), requests_per_second = VALUES(requests_per_second),
           monthly_units = VALUES(monthly_units), limits = VALUES(limits), updated_at = CURRENT_TIMESTAMP(3)`,
        [code, p.label, p.rank, CURRENCY, p.monthlyFeeMinor, p.includedUnits, p.overagePerMillionMinor, p.requestsPerSecond, p.monthlyUnits, JSON.stringify(limits)],
      );
    }
  } finally {
    await conn.end();
  }
}
