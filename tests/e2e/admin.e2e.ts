import fs from "node:fs";
import path from "node:path";
import { describe, expect, inject, it } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

/** The verification link in the mail the catcher kept for `to` (quoted-printable soft breaks undone). */
function verificationLinkFor(to: string): string {
  const dir = path.join(inject("dataDir"), "mail");
  const raw = fs
    .readdirSync(dir)
    .filter((f) => f.endsWith(".eml"))
    .map((f) =>
      fs
        .readFileSync(path.join(dir, f), "utf8")
        .replace(/=\r?\n/g, "")
        .replace(/=3D/g, "="),
    )
    .find((m) => new RegExp(`^To: .*${to.replace(/[.+]/g, "\\$&")}`, "mi").test(m) && m.includes("verify-email"));
  const link = raw?.match(/https?:\/\/\S+verify-email\S+/)?.[0];
  if (!link) throw new Error(`no verification mail for ${to}`);
  return link;
}

describe("club officers", () => {
  it("change the confidence level, which recomputes the summaries, and are told what to fix", async () => {
    const page = await browser().newPage();
    await signInAs(page, "admin@example.org");
    await page.goto(`${baseUrl()}/admin/settings`);
    await page.getByLabel("Minimum reports before a summary can be leaned on").fill("zero");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText("Some settings need fixing; nothing was changed.").waitFor();
    expect(await page.locator("#minReports-error").textContent()).toMatch(/whole number/);

    await page.getByLabel("Minimum reports before a summary can be leaned on").fill("5");
    await page.getByLabel("Confidence level of intervals").selectOption("90");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText(/summary is being recomputed/).waitFor();
    await page.goto(`${baseUrl()}/evidence?agent=hydrogen-peroxide`);
    await page.getByText("Intervals are 90 %").waitFor();

    await page.goto(`${baseUrl()}/admin/settings`);
    await page.getByLabel("Confidence level of intervals").selectOption("95");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText(/summary is being recomputed/).waitFor();
    await page.close();
  });

  it("read the verification mail of a new member in the outbox and edit the catalogue", async () => {
    const visitor = await browser().newPage();
    await visitor.goto(`${baseUrl()}/sign-up`);
    await visitor.getByLabel("Display name").fill("Wren Newcomer");
    await visitor.getByLabel("E-mail").fill("wren@example.org");
    await visitor.getByLabel("Password", { exact: true }).fill("a-long-enough-password");
    await visitor.getByLabel("Password again").fill("a-long-enough-password");
    await visitor.getByRole("button", { name: "Create account" }).click();
    await visitor.getByText("Check your inbox").waitFor();

    const admin = await browser().newPage();
    await signInAs(admin, "admin@example.org");
    await admin.goto(`${baseUrl()}/admin/mail`);
    await admin.getByRole("link", { name: "Confirm your e-mail address for Tanklore" }).first().click();
    // The outbox shows who got the link, never a usable one.
    expect(await admin.getByTestId("mail-text").textContent()).toContain("/api/auth/verify-email?token=•••");
    expect(await admin.locator("pre a").count()).toBe(0);
    // The newcomer's own inbox (the catcher's file) holds the live link: it confirms the address and signs them in.
    const href = verificationLinkFor("wren@example.org");
    await visitor.goto(href);
    await visitor.getByTestId("signed-in-as").filter({ hasText: "Wren Newcomer" }).waitFor();

    await admin.goto(`${baseUrl()}/admin/catalogue?list=conditions`);
    await admin.getByRole("button", { name: "Add new" }).click();
    await admin.getByLabel("Slug").fill("hole-in-the-head");
    await admin.getByLabel("Name", { exact: true }).fill("Hole-in-the-head");
    await admin.getByRole("button", { name: "Add", exact: true }).click();
    await admin.getByText("Added.").waitFor();
    await admin.getByText("hole-in-the-head").first().waitFor();
    await visitor.close();
    await admin.close();
  });

  it("see the background work, with each round's schedule, and run a round from the page", async () => {
    // A reset request queues a notice mail, which the job runner sends (into the outbox) within moments.
    const ask = await fetch(`${baseUrl()}/api/auth/request-password-reset`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: baseUrl() },
      body: JSON.stringify({ email: "keeper4@example.org", redirectTo: "/reset-password" }),
    });
    expect(ask.status).toBe(200);
    const admin = await browser().newPage();
    await signInAs(admin, "admin@example.org");
    await admin.goto(`${baseUrl()}/admin/jobs`);
    await admin.getByRole("heading", { name: "Background work" }).waitFor();
    const rounds = admin.getByTestId("job-rounds");
    for (const name of ["Moderators' digest", "Nightly backup", "Reminders"])
      expect(await rounds.getByText(name, { exact: true }).count(), name).toBe(1);
    // The demo's mails were all kept by the outbox: nothing is failing, and the page says so.
    await admin.getByText("Nothing is failing.").waitFor();
    const mailsDone = async () => {
      await admin.reload();
      const row = admin.getByTestId("job-counts").getByRole("row", { name: /Notice mails/ });
      return (await row.count()) ? Number(await row.getByRole("cell").nth(3).textContent()) : 0;
    };
    await expect.poll(mailsDone, { timeout: 10_000 }).toBeGreaterThan(0);

    const posts: number[] = [];
    admin.on(
      "response",
      (r) => r.url().endsWith("/api/admin/jobs") && r.request().method() === "POST" && posts.push(r.status()),
    );
    await admin.getByRole("button", { name: /^Run now\W+Reminders$/ }).click();
    await rounds.getByText("Done.").waitFor();
    expect(posts).toEqual([200]);
    await admin.close();
  });
});
