import { beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import * as chartRoute from "@/app/(evidence)/evidence/[group]/chart/[kind]/route";
import * as groupsChartRoute from "@/app/(evidence)/evidence/groups-chart.svg/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { getSummaries, getSummaryDetail, recomputeGroupAgent } from "@/features/evidence/server";
import { chartSrc, groupsChartSrc } from "@/features/evidence/components/chart-figures";
import { call } from "../support/http";

const AGENT = "hydrogen-peroxide";
let group = "";
let second = "";
let empty = "";
let otherAgent = "";

const chart = (
  g: string,
  kind: string,
  query: string,
  opts: { headers?: Record<string, string>; method?: string } = {},
) => call(chartRoute.GET, `/evidence/${g}/chart/${kind}?${query}`, { ...opts, params: { group: g, kind } });

beforeAll(async () => {
  const db = await getDb();
  await seedCatalogue(db);
  await db.insert(schema.users).values({
    id: "image-author",
    name: "Image Author",
    email: "image-author@example.org",
    emailVerified: true,
    role: "member",
  });
  const groups = (await db.execute(sql`
    select slug from species_groups where hidden = false order by sort_order, slug limit 3`)) as unknown as {
    rows: { slug: string }[];
  };
  [group, second, empty] = groups.rows.map((r) => r.slug) as [string, string, string];
  otherAgent = (await db.select({ slug: schema.agents.slug }).from(schema.agents)).find((a) => a.slug !== AGENT)!.slug;
  const conditions = (await db.select({ slug: schema.conditions.slug }).from(schema.conditions)).map((c) => c.slug);
  // Above the points limit (so the charts draw bins), doses 2.5 to 90 mg/L; more go badly as the dose rises.
  // A second group below it (one dot per report), for the index's comparison of groups.
  const rows = Array.from({ length: 480 }, (_, k) => {
    const dose = k < 420 ? 2.5 + ((k * 37) % 351) / 4 : 5 + (k % 12) * 2;
    const bad = (k * 7919) % 100 < dose;
    return {
      id: `image-${k}`,
      authorId: "image-author",
      status: "accepted" as const,
      groupSlug: k < 420 ? group : second,
      agentSlug: AGENT,
      conditionSlug: conditions[k % 2]!,
      conditionOutcome: "improved" as const,
      concentration: dose,
      fishCount: 3,
      fishLost: bad ? 1 : 0,
      lossCause: bad ? ("treatment" as const) : null,
      distress: "mild" as const,
    };
  });
  for (let k = 0; k < rows.length; k += 200)
    await db.insert(schema.reports).values(rows.slice(k, k + 200) as (typeof schema.reports.$inferInsert)[]);
  await recomputeGroupAgent(db, group, AGENT);
  await recomputeGroupAgent(db, second, AGENT);
}, 120_000);

describe("a group's chart images", () => {
  it("serves each chart at each drawing width as a compact SVG document in a system font", async () => {
    expect((await getSummaryDetail(group, AGENT)).doseResponse?.bmd).toBeGreaterThan(0);
    for (const kind of ["dose", "band", "risk"])
      for (const w of [330, 580, 960]) {
        const { status, body, res } = await chart(group, kind, `agent=${AGENT}&w=${w}`);
        expect(status, `${kind} ${w}`).toBe(200);
        expect(res.headers.get("content-type")).toMatch(/^image\/svg\+xml/);
        expect(body).toMatch(new RegExp(`^<svg xmlns="http://www.w3.org/2000/svg" [^>]*viewBox="0 0 ${w} `));
        expect(body).toContain('font-family="system-ui, sans-serif"');
        // Tooltips and Plot's stylesheet left out; coordinates to a tenth of a pixel.
        expect(body).not.toMatch(/<title>|<style>/);
        for (const [, d] of (body as string).matchAll(/ d="([^"]*)"/g)) expect(d).not.toMatch(/\d\.\d\d/);
      }
  });

  it("is cached for good under the page's address and revalidated by its ETag", async () => {
    const summary = await getSummaryDetail(group, AGENT);
    const src = chartSrc(summary, "risk")(580);
    expect(src).toMatch(new RegExp(`^/evidence/${group}/chart/risk\\?agent=${AGENT}&w=580&v=\\w+$`));
    const current = await chart(group, "risk", src.split("?")[1]!);
    expect(current.status).toBe(200);
    expect(current.res.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
    const etag = current.res.headers.get("etag")!;
    expect(etag).toMatch(/^".+"$/);
    // Another fingerprint (figures changed since the page was drawn): the current chart, rechecked soon.
    const older = await chart(group, "risk", `agent=${AGENT}&w=580&v=older`);
    expect(older.body).toBe(current.body);
    expect(older.res.headers.get("cache-control")).toBe("public, max-age=60");
    const again = await chart(group, "risk", `agent=${AGENT}&w=580`, { headers: { "if-none-match": etag } });
    expect(again.status).toBe(304);
    expect(again.body).toBeNull();
  });

  it("answers bad addresses with the error envelope", async () => {
    const width = await chart(group, "dose", `agent=${AGENT}&w=500`);
    expect(width.status).toBe(422);
    expect(JSON.stringify(width.body.error.issues)).toMatch(/330, 580, 960/);
    expect((await chart(group, "dose", `agent=${AGENT}`)).status).toBe(422);
    const kind = await chart(group, "pie", `agent=${AGENT}&w=330`);
    expect(kind.status).toBe(404);
    expect(kind.body.error.code).toBe("not_found");
    expect((await chart("no-such-group", "dose", `agent=${AGENT}&w=330`)).body.error.code).toBe("not_found");
    expect((await chart(group, "dose", `agent=no-such-agent&w=330`)).body.error).toBeDefined();
    // A group without reports has no fitted curve to draw.
    expect((await chart(empty, "risk", `agent=${AGENT}&w=330`)).body.error.code).toBe("not_found");
    const post = await call(chartRoute.POST, `/evidence/${group}/chart/dose?w=330`, { method: "POST" });
    expect(post.status).toBe(405);
    expect(post.res.headers.get("allow")).toMatch(/GET/);
  });
});

describe("the evidence index's groups comparison image", () => {
  const groupsChart = (query: string) =>
    call(groupsChartRoute.GET, `/evidence/groups-chart.svg?${query}`, { params: {} });

  it("draws the groups with tolerated doses at a drawing width, under the index's address", async () => {
    const summaries = await getSummaries(AGENT);
    const src = groupsChartSrc(summaries, undefined)(960);
    const { status, body, res } = await groupsChart(src.split("?")[1]!);
    expect(status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^image\/svg\+xml/);
    expect(res.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
    expect(body).toMatch(/^<svg xmlns="http:\/\/www.w3.org\/2000\/svg" [^>]*viewBox="0 0 960 /);
    const names = summaries.groups.filter((g) => g.reports > 0).map((g) => g.group.name);
    expect(names).toHaveLength(2);
    for (const name of names) expect(body).toContain(`>${name}<`);
  });

  it("answers a choice without two groups to compare, or a bad width, with the error envelope", async () => {
    const none = await groupsChart(`agent=${otherAgent}&w=580`);
    expect(none.status).toBe(404);
    expect(none.body.error.code).toBe("not_found");
    expect((await groupsChart(`agent=${AGENT}&w=12`)).status).toBe(422);
    expect((await call(groupsChartRoute.PUT, `/evidence/groups-chart.svg`, { method: "PUT" })).status).toBe(405);
  });
});
