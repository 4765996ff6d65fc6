// The portal's start-up hook: a metering flush that crosses 80% of the plan's monthly units mails the
// billing contacts once; the expiry scan runs at start.
import { afterAll, describe, expect, it } from "vitest";
import { flushUsage, recordUsage } from "@/lib/api/metering";
import { PLANS } from "@/lib/api/plans";
import { startPortalSchedules } from "@/lib/portal/schedule";
import { makeTeam, mailTo, uniq, waitForMail } from "./support";

afterAll(async () => {
  await flushUsage();
});

describe("startPortalSchedules", () => {
  it("sends the 80% quota e-mail from the metering flush, and only once for the month", async () => {
    startPortalSchedules();
    startPortalSchedules();
    const team = await makeTeam("Kilnsey Assurance");
    const units = Math.ceil(PLANS.starter.monthlyUnits * 0.85);
    recordUsage({ requestId: `s-${uniq()}`, keyId: team.devKey.id, organizationId: team.org.id, endpoint: "POST /api/v1/moments", status: 200, durationMs: 5, computeUnits: units });
    await flushUsage();
    const mails = await waitForMail(team.billing.email);
    expect(mails.map((m) => m.subject)).toEqual(["[Kilnsey Assurance] 80% of this month's compute units used"]);
    recordUsage({ requestId: `s-${uniq()}`, keyId: team.devKey.id, organizationId: team.org.id, endpoint: "POST /api/v1/moments", status: 200, durationMs: 5, computeUnits: 1 });
    await flushUsage();
    // A later flush still below 100% mails nothing more.
    await new Promise((r) => setTimeout(r, 300));
    expect(await mailTo(team.billing.email)).toHaveLength(1);
  });
});
