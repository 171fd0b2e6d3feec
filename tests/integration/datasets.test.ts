// Datasets API against the running app: multipart upload with mapping and units, row-and-column
// errors (never a 500), the 5 MB limit, workspace scoping, roles, and the period analysis of the
// seeded synthetic dataset.
import { afterAll, describe, expect, it } from "vitest";
import postgres from "postgres";
import { csvText, datasetForm } from "../support/csv";
import { api, databaseUrl } from "../support/services";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });
const created: string[] = [];
afterAll(async () => {
  if (created.length) await sql`delete from datasets where id in ${sql(created)} and not exists (select 1 from fits where fits.dataset_id = datasets.id)`;
  await sql.end();
});

function upload(csv: string, fields: Record<string, string>, as: "researcher" | "viewer" | "student" = "researcher") {
  return api("/api/v1/datasets", { method: "POST", body: datasetForm(csv, fields), as });
}

const mapping = { name: "it resistance curve", xColumn: "B (mT)", xUnit: "mT", yColumn: "R (kohm)", yUnit: "kohm", sigmaColumn: "dR (kohm)" };
const goodCsv = "# integration test\nB (mT),R (kohm),dR (kohm)\n0,12.9064037,0.01\n10,25.81280745,0.02\n20,25.81280745,0.02\n30,12.9064037,0.01\n";

describe("POST /api/v1/datasets", () => {
  it("stores a mapped CSV with its original file and converts to engine units (201)", async () => {
    const res = await upload(goodCsv, mapping);
    expect(res.status).toBe(201);
    const body = await res.json();
    created.push(body.id);
    expect(body).toMatchObject({ rows: 4, xQuantity: "field", xUnit: "T", yUnit: "e2/h", hasSigma: true, synthetic: false });
    const got = await (await api(`/api/v1/datasets/${body.id}`)).json();
    // 12.9064037 kohm = h/(2e^2): conductance 2 e^2/h (h/e^2 = 25812.80745 ohm, exact SI)
    expect(got.points.y[0]).toBeCloseTo(2, 6);
    expect(got.points.x).toEqual([0, 0.01, 0.02, 0.03]);
    const original = await api(`/api/v1/datasets/${body.id}/original`);
    expect(await original.text()).toBe(goodCsv);
    const list = await (await api("/api/v1/datasets")).json();
    expect(list.items.map((d: { id: string }) => d.id)).toContain(body.id);
  });

  it("answers 422 naming row and column for a bad cell, a missing column, unsorted x and mixed units", async () => {
    const cases: [string, Record<string, string>, { code: string; row: number; column: string }][] = [
      ["B (mT),R (kohm),dR (kohm)\n0,1,0.1\n10,x1,0.1\n20,1,0.1\n30,1,0.1\n", mapping, { code: "non_numeric", row: 3, column: "R (kohm)" }],
      ["field,R (kohm)\n0,1\n", mapping, { code: "missing_column", row: 1, column: "B (mT)" }],
      ["B (mT),R (kohm),dR (kohm)\n0,1,0.1\n20,1,0.1\n10,1,0.1\n30,1,0.1\n", mapping, { code: "unsorted_x", row: 4, column: "B (mT)" }],
      [
        "B,G\n1 T,1\n2 T,1\n3 mT,1\n4 T,1\n",
        { name: "m", xColumn: "B", xUnit: "T", yColumn: "G", yUnit: "e2/h" },
        { code: "mixed_units", row: 4, column: "B" },
      ],
    ];
    for (const [csv, fields, issue] of cases) {
      const res = await upload(csv, fields);
      expect(res.status).toBe(422);
      const body = await res.json();
      expect(body.error.code).toBe("invalid_input");
      expect(body.error.details.issues[0]).toMatchObject(issue);
    }
  });

  it("names a bad mapping field, refuses non-multipart bodies and files over 5 MB", async () => {
    const bad = await upload(goodCsv, { ...mapping, xUnit: "gauss" });
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.message).toMatch(/xUnit/);
    const json = await api("/api/v1/datasets", { method: "POST", json: { name: "x" } });
    expect(json.status).toBe(400);
    const big = csvText(["B", "G"], Array(300_000).fill(["0.000001", "1.000000"]), { finalNewline: true });
    const res = await upload(big, { name: "big", xColumn: "B", xUnit: "T", yColumn: "G", yUnit: "e2/h" });
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toMatch(/5 MB/);
  });

  it("lets a viewer read but not upload, and keeps datasets inside their workspace", async () => {
    expect((await upload(goodCsv, mapping, "viewer")).status).toBe(403);
    const res = await upload(goodCsv, { ...mapping, name: "student curve" }, "student");
    expect(res.status).toBe(201);
    const mine = await res.json();
    created.push(mine.id);
    expect((await api(`/api/v1/datasets/${mine.id}`, { as: "researcher" })).status).toBe(404);
    expect((await api(`/api/v1/datasets/${mine.id}`, { as: "student" })).status).toBe(200);
    expect((await api("/api/v1/datasets/not-a-uuid")).status).toBe(404);
  });
});

describe("POST /api/v1/datasets/{id}/period", () => {
  it("finds the field period of the seeded synthetic LK-07 curve and reads it as twist angle", async () => {
    const list = await (await api("/api/v1/datasets", { as: "viewer" })).json();
    const lk07 = list.items.find((d: { name: string }) => d.name === "LK-07 magnetoconductance (synthetic)");
    expect(lk07).toBeTruthy();
    expect(lk07.synthetic).toBe(true);
    const res = await api(`/api/v1/datasets/${lk07.id}/period`, { method: "POST", as: "viewer" });
    expect(res.status).toBe(200);
    const r = await res.json();
    // The curve was made at 0.11 degrees: l = 0.246 nm / (2 sin(0.055 deg)), one flux quantum
    // h/e per triangle (sqrt3/4) l^2 gives dB = (h/e) / A_triangle (physics.md sections 2, 4).
    const l = 0.246 / (2 * Math.sin((0.055 * Math.PI) / 180));
    const dB = 6.62607015e-34 / 1.602176634e-19 / ((Math.sqrt(3) / 4) * l * l * 1e-18);
    expect(Math.abs(r.periodTesla - dB) / dB).toBeLessThan(0.03);
    expect(Math.abs(r.perTriangle.twistDegrees - 0.11) / 0.11).toBeLessThan(0.02);
    expect(r.perTriangle.assumption).toMatch(/triangle/);
    expect(r.perUnitCell.periodNm).toBeCloseTo(r.perTriangle.periodNm / Math.SQRT2, 6);
    expect(r.spectrum.frequencyPerTesla.length).toBe(r.spectrum.amplitude.length);
    const bad = await api(`/api/v1/datasets/${lk07.id}/period`, { method: "POST", json: { backgroundDegree: 20 }, as: "viewer" });
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.message).toMatch(/backgroundDegree/);
  });

  it("refuses the period analysis of a gate-voltage curve with a reason", async () => {
    const res = await upload("Vg,G\n-1,1\n-0.5,1.1\n0,1.2\n0.5,1.3\n", { name: "it gate curve", xColumn: "Vg", xUnit: "V", yColumn: "G", yUnit: "uS" });
    expect(res.status).toBe(201);
    const d = await res.json();
    created.push(d.id);
    const p = await api(`/api/v1/datasets/${d.id}/period`, { method: "POST" });
    expect(p.status).toBe(422);
    expect((await p.json()).error.message).toMatch(/field/);
  });
});
