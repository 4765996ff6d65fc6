// The local SMTP sink keeps what nodemailer sends, and shows it on its mailbox page.
import nodemailer from "nodemailer";
import { describe, expect, it } from "vitest";
import { testLayout } from "../support/layout";

const layout = testLayout();

describe("SMTP sink", () => {
  it("stores a message sent over plain SMTP and lists it", async () => {
    const to = `sink-${Date.now()}@kestrel.example`;
    const transport = nodemailer.createTransport(process.env.SMTP_URL!);
    await transport.sendMail({ from: process.env.MAIL_FROM, to, subject: "Tolerance report ready", text: "See https://example.invalid/r/1" });
    const res = await fetch(`http://127.0.0.1:${layout.mailboxPort}/messages.json?to=${encodeURIComponent(to)}`);
    const messages = (await res.json()) as { subject: string; text: string; id: string }[];
    expect(messages).toHaveLength(1);
    expect(messages[0].subject).toBe("Tolerance report ready");
    expect(messages[0].text).toContain("https://example.invalid/r/1");
    const page = await (await fetch(`http://127.0.0.1:${layout.mailboxPort}/`)).text();
    expect(page).toContain("Tolerance report ready");
    const one = await (await fetch(`http://127.0.0.1:${layout.mailboxPort}/messages/${messages[0].id}`)).text();
    expect(one).toContain(to);
  });
});
