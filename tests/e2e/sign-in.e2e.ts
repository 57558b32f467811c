import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { describe, expect, inject, it } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

describe("signing in", () => {
  it("shows the demo member's name after signing in through the form", async () => {
    const page = await browser().newPage();
    await signInAs(page, "member@example.org");
    expect(await page.getByTestId("signed-in-as").textContent()).toContain("Priya Sandwell");
    // The demo club says on every page that it is invented.
    expect(await page.getByTestId("demo-banner").textContent()).toMatch(/invented/);
    // A member is not shown the admin links, and the admin page itself refuses them.
    expect(await page.getByRole("link", { name: "Members" }).count()).toBe(0);
    // The server refuses the page; the redirect may arrive while the page streams, so wait for it.
    await page.goto(`${baseUrl()}/admin/members`);
    await page.waitForURL(/\/forbidden/);
    expect(await page.getByRole("heading", { name: "Not for your role" }).count()).toBe(1);
    await page.close();
  });

  it("brings a visitor who opens the report form back to it after signing in", async () => {
    const page = await browser().newPage();
    await page.goto(`${baseUrl()}/reports/new`);
    await page.waitForURL(/\/sign-in\?next=%2Freports%2Fnew/);
    await page.getByLabel("E-mail").fill("member2@example.org");
    await page.getByLabel("Password").fill(inject("demoPassword"));
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => url.pathname === "/reports/new");
    expect(new URL(page.url()).pathname).toBe("/reports/new");
    await page.close();
  });

  it("says what is wrong when the password does not match", async () => {
    const page = await browser().newPage();
    await page.goto(`${baseUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("member2@example.org");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    // Next.js keeps an empty route announcer with role=alert; ours is the one in the form.
    const alert = page.locator("form [role=alert]");
    await alert.waitFor();
    expect(await alert.textContent()).toMatch(/do not match an account/);
    await page.close();
  });

  it("lets the demo admin sort the members table and see every demo account", async () => {
    const page = await browser().newPage();
    await signInAs(page, "admin@example.org");
    await page.goto(`${baseUrl()}/admin/members`);
    // Twelve demo accounts, and any the other browser tests signed up.
    const counter = page.getByText(/^\d+ members$/);
    await counter.waitFor();
    expect(Number((await counter.textContent())!.split(" ")[0])).toBeGreaterThanOrEqual(12);
    await page.getByRole("button", { name: /^E-mail/ }).click();
    await page
      .getByRole("columnheader", { name: /E-mail/ })
      .and(page.locator("[aria-sort=ascending]"))
      .waitFor();
    // Sorted by name, Ade Okonrin leads; by e-mail, the admin account does (once the page arrives).
    await page.locator("tbody tr").first().filter({ hasText: "admin@example.org" }).waitFor();
    expect(await page.locator("tbody tr").first().textContent()).toContain("Orla Quillfeather");
    await page.screenshot({ path: "tests/e2e/.artifacts/members.png", fullPage: true });
    await page.close();
  });
});

/** The mail the catcher kept for `to` whose subject matches, newest last (quoted-printable soft breaks undone). */
function mailsFor(to: string, subject: RegExp): string[] {
  const dir = path.join(inject("dataDir"), "mail");
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith(".eml"))
    .sort()
    .map((f) =>
      fs
        .readFileSync(path.join(dir, f), "utf8")
        .replace(/=\r?\n/g, "")
        .replace(/=3D/g, "="),
    )
    .filter((m) => new RegExp(`^To: .*${to.replace(/[.+]/g, "\\$&")}`, "mi").test(m) && subject.test(m));
}

async function newestLink(to: string, subject: RegExp, pattern: RegExp): Promise<string> {
  for (let i = 0; i < 50; i++) {
    const link = mailsFor(to, subject).at(-1)?.match(pattern)?.[0];
    if (link) return link;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail "${subject}" for ${to}`);
}

/**
 * A confirmation token as the server issues it (an HS256 JWT over the address, signed with the server's secret, which
 * the app keeps in its data directory), but already expired: the only way to hold an expired link without waiting an hour.
 */
function expiredVerificationToken(email: string): string {
  const secret = fs.readFileSync(path.join(inject("dataDir"), "auth-secret"), "utf8").trim();
  const b64 = (o: unknown) => Buffer.from(JSON.stringify(o)).toString("base64url");
  const now = Math.floor(Date.now() / 1000);
  const body = `${b64({ alg: "HS256", typ: "JWT" })}.${b64({ email, iat: now - 7200, exp: now - 3600 })}`;
  return `${body}.${crypto.createHmac("sha256", secret).update(body).digest("base64url")}`;
}

const PLAIN = /\b[a-z]+_[a-z_]+\b|\b[A-Z]+_[A-Z_]+\b|\d{4}-\d{2}-\d{2}T/;

describe("the confirmation and reset links say what happened", () => {
  for (const width of [1280, 390]) {
    it(`confirms a good link, says an expired or invalid one failed and what to do (${width} px)`, async () => {
      const email = `linktest-${width}@example.org`;
      const context = await browser().newContext({ viewport: { width, height: 844 } });
      const page = await context.newPage();
      const signUp = await page.request.post(`${baseUrl()}/api/auth/sign-up/email`, {
        headers: { origin: baseUrl() },
        data: {
          name: `Link Tester ${width}`,
          email,
          password: "a-long-enough-password",
          callbackURL: "/sign-in?verified=1",
        },
      });
      expect(signUp.status()).toBe(200);
      const good = await newestLink(email, /Subject: Confirm your e-mail address/, /https?:\/\/\S+verify-email\S+/);

      // Expired first (the address is still unconfirmed), then invalid, then the good link.
      const callback = encodeURIComponent("/sign-in?verified=1");
      await page.goto(
        `${baseUrl()}/api/auth/verify-email?token=${expiredVerificationToken(email)}&callbackURL=${callback}`,
      );
      await page.waitForURL(/error=/);
      let outcome = page.getByTestId("verification-outcome");
      await outcome.waitFor();
      expect(await outcome.textContent()).toMatch(/has expired.*not confirmed yet.*sign in below.*fresh link/is);

      await page.goto(`${baseUrl()}/api/auth/verify-email?token=not-a-token&callbackURL=${callback}`);
      await page.waitForURL(/error=/);
      outcome = page.getByTestId("verification-outcome");
      await outcome.waitFor();
      expect(await outcome.textContent()).toMatch(/is invalid.*not confirmed.*fresh link/is);
      expect(await page.locator("main").innerText()).not.toMatch(/Address confirmed|is confirmed\./);
      expect(await page.locator("main").innerText()).not.toMatch(PLAIN);

      await page.goto(good);
      await page.waitForURL(/verified=1/);
      expect(page.url()).not.toMatch(/error=/);
      await page.getByTestId("verification-outcome").filter({ hasText: "Address confirmed" }).waitFor();
      await page
        .getByTestId("signed-in-as")
        .filter({ hasText: `Link Tester ${width}` })
        .waitFor();
      expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);
      await context.close();
    });

    it(`lets a good reset link change the password once, and says a used or invalid one did not (${width} px)`, async () => {
      const email = `linktest-${width}@example.org`;
      const context = await browser().newContext({ viewport: { width, height: 844 } });
      const page = await context.newPage();
      const asked = await page.request.post(`${baseUrl()}/api/auth/request-password-reset`, {
        headers: { origin: baseUrl() },
        data: { email, redirectTo: "/reset-password" },
      });
      expect(asked.status()).toBe(200);
      const good = await newestLink(
        email,
        /Subject: Choose a new Tanklore password/,
        /https?:\/\/\S+\/api\/auth\/reset-password\/\S+/,
      );

      // An invalid link: the form is not offered, and the page says the password did not change and what to do.
      await page.goto(
        `${baseUrl()}/api/auth/reset-password/not-a-token?callbackURL=${encodeURIComponent("/reset-password")}`,
      );
      await page.waitForURL(/\/reset-password\?error=/);
      await page.getByRole("heading", { name: "This reset link does not work" }).waitFor();
      expect(await page.getByTestId("reset-outcome").textContent()).toMatch(
        /password was not changed.*expired.*already used.*ask for a new reset link/is,
      );
      expect(await page.getByLabel("New password", { exact: true }).count()).toBe(0);
      expect(await page.locator("main").innerText()).not.toMatch(PLAIN);

      // The good link opens the form, and the new password works.
      await page.goto(good);
      await page.waitForURL(/\/reset-password\?token=/);
      await page.getByRole("heading", { name: "Choose a new password" }).waitFor();
      await page.getByLabel("New password", { exact: true }).fill("another-long-password");
      await page.getByLabel("New password again").fill("another-long-password");
      await page.getByRole("button", { name: "Save the new password" }).click();
      await page.waitForURL(/\/sign-in\?reset=1/);
      await page.getByTestId("verification-outcome").filter({ hasText: "Password changed" }).waitFor();

      // The same link again: used up. better-auth answers a used and an expired reset link alike (INVALID_TOKEN), so
      // this is also what an expired link shows.
      await page.goto(good);
      await page.waitForURL(/\/reset-password\?error=/);
      await page.getByRole("heading", { name: "This reset link does not work" }).waitFor();
      expect(await page.getByTestId("reset-outcome").textContent()).toMatch(/password was not changed/);
      expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);
      await context.close();
    });
  }
});
