import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import * as listRoute from "@/app/api/admin/catalogue/[kind]/route";
import * as entryRoute from "@/app/api/admin/catalogue/[kind]/[key]/route";
import * as mergeRoute from "@/app/api/admin/catalogue/species/[key]/merge/route";
import * as reportsRoute from "@/app/api/reports/route";
import * as catalogueRoute from "@/app/api/catalogue/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let admin: U, member: U, mod: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  admin = await signedInUser("admin");
  member = await signedInUser("member");
  mod = await signedInUser("moderator");
});

describe("catalogue management", () => {
  it("is for admins only", async () => {
    expect((await call(listRoute.GET, "/api/admin/catalogue/species", { params: { kind: "species" } })).status).toBe(
      401,
    );
    expect(
      (
        await call(listRoute.GET, "/api/admin/catalogue/species", {
          params: { kind: "species" },
          cookie: member.cookie,
        })
      ).status,
    ).toBe(403);
    expect(
      (await call(listRoute.GET, "/api/admin/catalogue/species", { params: { kind: "species" }, cookie: mod.cookie }))
        .status,
    ).toBe(403);
    expect(
      (await call(listRoute.GET, "/api/admin/catalogue/fish", { params: { kind: "fish" }, cookie: admin.cookie }))
        .status,
    ).toBe(404);
  });

  it("adds a species, refuses a bad one, edits and hides it, and records every change", async () => {
    const add = await call(listRoute.POST, "/api/admin/catalogue/species", {
      params: { kind: "species" },
      cookie: admin.cookie,
      body: { scientificName: "Corydoras habrosus", commonName: "Salt-and-pepper cory", groupSlug: "corydoras" },
    });
    expect(add.status).toBe(201);
    expect(add.body.key).toBe("corydoras-habrosus");
    const bad = await call(listRoute.POST, "/api/admin/catalogue/species", {
      params: { kind: "species" },
      cookie: admin.cookie,
      body: { scientificName: "cory", commonName: "x", groupSlug: "nope" },
    });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(["commonName", "scientificName"]);
    const dupe = await call(listRoute.POST, "/api/admin/catalogue/species", {
      params: { kind: "species" },
      cookie: admin.cookie,
      body: { scientificName: "Corydoras habrosus", commonName: "Again", groupSlug: "corydoras" },
    });
    expect(dupe.status).toBe(409);

    const edit = await call(entryRoute.PATCH, "/api/admin/catalogue/species/corydoras-habrosus", {
      params: { kind: "species", key: "corydoras-habrosus" },
      cookie: admin.cookie,
      method: "PATCH",
      body: { commonName: "Dwarf salt-and-pepper cory" },
    });
    expect(edit.status).toBe(200);
    const db = await getDb();
    const [sp] = await db.select().from(schema.species).where(eq(schema.species.id, "corydoras-habrosus"));
    expect(sp).toMatchObject({ commonName: "Dwarf salt-and-pepper cory", hidden: false });
    await call(entryRoute.PATCH, "/api/admin/catalogue/species/corydoras-habrosus", {
      params: { kind: "species", key: "corydoras-habrosus" },
      cookie: admin.cookie,
      method: "PATCH",
      body: { hidden: true },
    });
    const cat = await call(catalogueRoute.GET, "/api/catalogue");
    expect(cat.body.species.map((s: { id: string }) => s.id)).not.toContain("corydoras-habrosus");
    const changes = await db
      .select()
      .from(schema.catalogueChanges)
      .where(eq(schema.catalogueChanges.entityKey, "corydoras-habrosus"));
    expect(changes.map((c) => c.action)).toEqual(["create", "update", "update"]);
    expect(changes.every((c) => c.actorId === admin.id)).toBe(true);
  });

  it("refuses to delete a species in use, and merges it into another instead", async () => {
    const r = await call(reportsRoute.POST, "/api/reports", {
      cookie: member.cookie,
      body: reportBody({ speciesId: "corydoras-paleatus" }),
    });
    expect(r.status).toBe(201);
    const del = await call(entryRoute.DELETE, "/api/admin/catalogue/species/corydoras-paleatus", {
      params: { kind: "species", key: "corydoras-paleatus" },
      cookie: admin.cookie,
      method: "DELETE",
    });
    expect(del.status).toBe(409);
    expect(del.body.error.message).toMatch(/cannot be deleted. Hide it instead, or merge it/);
    const merge = await call(mergeRoute.POST, "/api/admin/catalogue/species/corydoras-paleatus/merge", {
      params: { key: "corydoras-paleatus" },
      cookie: admin.cookie,
      body: { into: "corydoras-aeneus", note: "Same fish in our members' tanks." },
    });
    expect(merge.status).toBe(200);
    expect(merge.body.reportsMoved).toBe(1);
    const db = await getDb();
    const [moved] = await db.select().from(schema.reports).where(eq(schema.reports.id, r.body.id));
    expect(moved!.speciesId).toBe("corydoras-aeneus");
    const [gone] = await db.select().from(schema.species).where(eq(schema.species.id, "corydoras-paleatus"));
    expect(gone).toMatchObject({ hidden: true, mergedInto: "corydoras-aeneus" });
    const free = await call(listRoute.POST, "/api/admin/catalogue/conditions", {
      params: { kind: "conditions" },
      cookie: admin.cookie,
      body: { slug: "hexamita", name: "Hexamita" },
    });
    expect(free.status).toBe(201);
    expect(
      (
        await call(entryRoute.DELETE, "/api/admin/catalogue/conditions/hexamita", {
          params: { kind: "conditions", key: "hexamita" },
          cookie: admin.cookie,
          method: "DELETE",
        })
      ).status,
    ).toBe(200);
  });

  it("checks an agent's band edges and a w/w preset's density", async () => {
    const edges = await call(entryRoute.PATCH, "/api/admin/catalogue/agents/salt", {
      params: { kind: "agents", key: "salt" },
      cookie: admin.cookie,
      method: "PATCH",
      body: { bandEdges: [0, 5, 3] },
    });
    expect(edges.status).toBe(422);
    expect(edges.body.error.issues[0]).toMatchObject({
      path: "bandEdges",
      message: "Band edges must rise from left to right.",
    });
    const ok = await call(entryRoute.PATCH, "/api/admin/catalogue/agents/salt", {
      params: { kind: "agents", key: "salt" },
      cookie: admin.cookie,
      method: "PATCH",
      body: { bandEdges: [0, 2, 4, 8, 16, 32] },
    });
    expect(ok.status).toBe(200);
    const [salt] = await (await getDb()).select().from(schema.agents).where(eq(schema.agents.slug, "salt"));
    expect(salt!.bandEdges).toEqual([0, 2, 4, 8, 16, 32]);
    expect(salt!.hidden).toBe(false); // a PATCH without "hidden" leaves it alone
    const preset = await call(listRoute.POST, "/api/admin/catalogue/stock-forms", {
      params: { kind: "stock-forms" },
      cookie: admin.cookie,
      body: { id: "h2o2-9", agentSlug: "hydrogen-peroxide", label: "9 % w/w", percent: 9, basis: "w/w" },
    });
    expect(preset.status).toBe(422);
    expect(preset.body.error.issues[0].path).toBe("densityGPerMl");
  });
});
