import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import sharp from "sharp";
import { freePort } from "../support/free-port";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-e2e-restore-"));
let restoredServer: ChildProcess | undefined;

afterAll(async () => {
  restoredServer?.kill("SIGTERM");
  await new Promise((r) => setTimeout(r, 500));
  if (restoredServer && restoredServer.exitCode === null) restoredServer.kill("SIGKILL");
  fs.rmSync(scratch, { recursive: true, force: true });
});

/** Serves the already-built app on a restored data directory, on a port of its own. */
async function serveRestored(dataDir: string): Promise<string> {
  const port = await freePort();
  // The same server as `npm start` and the suite's own (db/http-server.ts).
  restoredServer = spawn(process.execPath, ["--import", "tsx", "db/http-server.ts"], {
    env: {
      ...process.env,
      NODE_ENV: "production",
      DATA_DIR: dataDir,
      PORT: String(port),
      BETTER_AUTH_URL: `http://localhost:${port}`,
      RATE_LIMIT: "off",
    },
    stdio: "ignore",
  });
  const url = `http://localhost:${port}`;
  for (let i = 0; i < 120; i++) {
    await new Promise((r) => setTimeout(r, 500));
    if (
      await fetch(`${url}/api/health`).then(
        (r) => r.ok,
        () => false,
      )
    )
      return url;
  }
  throw new Error("the restored club did not start");
}

describe("backups", () => {
  it("an officer turns the nightly backup on and off on the settings page", async () => {
    const page = await browser().newPage();
    await signInAs(page, "admin@example.org");
    await page.goto(`${baseUrl()}/admin/settings`);
    await page.getByText("Nightly backups are off.").waitFor();
    await page.getByLabel("Take a backup every night").check();
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText(/^Saved\./).waitFor();
    await page.reload();
    expect(await page.getByLabel("Take a backup every night").isChecked()).toBe(true);
    await page.getByText(/Nightly backups are on/).waitFor();
    await page.getByLabel("Take a backup every night").uncheck();
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText(/^Saved\./).waitFor();
    await page.close();
  });

  it("a backup downloaded from the running demo club, restored into an empty directory, serves the same reports, summaries and photos", async () => {
    // A member's draft with a photo, so the archive has photo files to carry.
    const member = await browser().newPage();
    await signInAs(member, "member@example.org");
    const draft = await member.request.post(`${baseUrl()}/api/reports/drafts`, {
      data: { speciesId: "paracheirodon-innesi", fishCount: 4 },
      headers: { origin: baseUrl() },
    });
    expect(draft.status()).toBe(201);
    const reportId = (await draft.json()).id as string;
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 40, g: 120, b: 80 } } })
      .jpeg()
      .toBuffer();
    const photo = await member.request.post(`${baseUrl()}/api/reports/${reportId}/photos`, {
      multipart: { file: { name: "tank.jpg", mimeType: "image/jpeg", buffer: jpeg }, stage: "before" },
      headers: { origin: baseUrl() },
    });
    expect(photo.status(), await photo.text()).toBe(201);
    const photoId = (await photo.json()).id as string;

    const admin = await browser().newPage();
    await signInAs(admin, "admin@example.org");
    await admin.goto(`${baseUrl()}/admin/settings`);
    const [download] = await Promise.all([
      admin.waitForEvent("download"),
      admin.getByRole("link", { name: "Download a backup now" }).click(),
    ]);
    expect(download.suggestedFilename()).toMatch(/^tanklore-backup-.+\.tar\.gz$/);
    const archive = path.join(scratch, download.suggestedFilename());
    await download.saveAs(archive);

    const target = path.join(scratch, "club");
    const env: NodeJS.ProcessEnv = { ...process.env, DATA_DIR: target };
    delete env.DATABASE_URL;
    delete env.BETTER_AUTH_SECRET;
    const restore = spawnSync(
      process.execPath,
      ["--conditions=react-server", "--import", "tsx", "db/restore.ts", archive],
      { env, encoding: "utf8" },
    );
    expect(restore.stderr).toBe("");
    expect(restore.status).toBe(0);
    expect(restore.stdout).toMatch(/every checksum matched/);
    expect(restore.stdout).toMatch(/session secret: .*auth-secret/);

    const restored = await serveRestored(target);
    const get = async (base: string, p: string) => {
      const r = await admin.request.get(`${base}${p}`);
      expect(r.status()).toBe(200);
      return r.json();
    };
    for (const p of [
      "/api/summaries?agent=hydrogen-peroxide",
      "/api/summaries/livebearers?agent=hydrogen-peroxide",
      "/api/review/queue",
    ]) {
      expect(await get(restored, p)).toEqual(await get(baseUrl(), p));
    }
    // The member's session from the live club is valid on the restored one: the secret and sessions came along.
    const mine = (p: string) => member.request.get(`${p}/api/reports?scope=mine&pageSize=100`).then((r) => r.json());
    expect(await mine(restored)).toEqual(await mine(baseUrl()));
    const bytes = async (base: string) =>
      Buffer.from(await (await member.request.get(`${base}/api/photos/${photoId}?size=full`)).body());
    const [live, back] = await Promise.all([bytes(baseUrl()), bytes(restored)]);
    expect(back.subarray(0, 2).toString("hex")).toBe("ffd8"); // a JPEG, not an error body
    expect(back.equals(live)).toBe(true);
    await member.close();
    await admin.close();
  }, 240_000);
});
