import "server-only";
import { planOf } from "@/lib/api/plans";
import { recordAudit } from "@/lib/db/audit";
import { getOrgById, listEmailsByRole } from "@/lib/db/portal";
import { sumUnits } from "@/lib/db/portal-usage";
import { claimQuotaNotice } from "@/lib/db/usage";
import { quotaMail } from "@/lib/mail/templates";
import { sendMail } from "@/lib/mail/transport";
import { baseUrl } from "./tokens";
import { monthStart, nextMonthStart } from "./usage";

export const QUOTA_THRESHOLDS = [80, 100] as const;

/**
 * E-mails the billing contacts and admins of each organisation when its units this month (UTC) reach 80% and
 * 100% of the plan's monthly quota, once per threshold per month: a quota_notices row is claimed with
 * INSERT IGNORE before the mail goes out, so concurrent callers send one message. Call after metering writes.
 */
export async function notifyQuotaThresholds(organizationIds: number[], now = new Date()): Promise<void> {
  const month = monthStart(now).toISOString().slice(0, 7);
  for (const organizationId of [...new Set(organizationIds)]) {
    try {
      const org = await getOrgById({ organizationId });
      if (!org) continue;
      const quota = planOf(org.plan).monthlyUnits;
      const used = await sumUnits({ organizationId, from: monthStart(now), to: nextMonthStart(now) });
      // Only the highest threshold reached is mailed; lower ones are marked sent with it.
      const reached = QUOTA_THRESHOLDS.filter((t) => used * 100 >= t * quota);
      if (reached.length === 0) continue;
      let top: number | null = null;
      for (const threshold of reached) {
        if (await claimQuotaNotice({ organizationId, month, threshold })) top = threshold;
      }
      if (top === null) continue;
      const to = await listEmailsByRole({ organizationId, roles: ["billing", "admin"] });
      await sendMail(to, quotaMail({ organization: org.name, threshold: top, used, quota, month, url: `${baseUrl()}/usage` }));
      await recordAudit({ organizationId, actorType: "system", action: "quota.threshold_notified", targetType: "organization", targetId: String(organizationId), detail: { month, threshold: top, used, quota } });
    } catch (e) {
      console.error("[sumfold] quota notice failed", { organizationId, error: (e as Error).message });
    }
  }
}
