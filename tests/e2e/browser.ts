import fs from "node:fs";
import { chromium, type Browser, type Page } from "playwright-core";
import { afterAll, beforeAll, inject } from "vitest";

const CHROMIUM = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

export async function launch(): Promise<Browser> {
  if (!fs.existsSync(CHROMIUM)) throw new Error(`Chromium not found at ${CHROMIUM}: apt-get install -y chromium`);
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-background-networking",
      "--disable-component-update",
      "--no-first-run",
      "--disable-sync",
      "--disable-quic",
    ],
  });
}

export const baseUrl = () => inject("baseUrl");

/** One Chromium for the calling test file, started before its tests and closed after them. */
export function useBrowser(): () => Browser {
  let browser: Browser | undefined;
  beforeAll(async () => {
    browser = await launch();
  });
  afterAll(async () => {
    await browser?.close();
  });
  return () => browser!;
}

/** Page object for signing in through the form. */
export async function signInAs(page: Page, email: string, password = inject("demoPassword")): Promise<void> {
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByTestId("signed-in-as").waitFor();
}
