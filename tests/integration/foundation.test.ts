// Skeleton end to end: PostgreSQL, Redis/BullMQ with the real worker process, the health endpoint.
import { afterAll, describe, expect, it } from "vitest";
import postgres from "postgres";
import { appUrl, databaseUrl } from "../support/services";
import { pingWorker } from "../support/worker";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });
afterAll(async () => {
  await sql.end();
});

describe("database", () => {
  it("has every migration applied and accepts a row that can be read back", async () => {
    const [{ count }] = await sql`select count(*)::int as count from drizzle.__drizzle_migrations`;
    expect(count).toBeGreaterThan(0);
    const slug = `it-${Date.now()}`;
    const [ws] = await sql`insert into workspaces (name, slug) values ('Integration check', ${slug}) returning id, plan, plan_state`;
    expect(ws.plan).toBe("free");
    const [back] = await sql`select name from workspaces where id = ${ws.id}`;
    expect(back.name).toBe("Integration check");
    await sql`delete from workspaces where id = ${ws.id}`;
  });

  it("holds the demo scenario (product.md)", async () => {
    const [lab] = await sql`select id, plan from workspaces where name = 'Larkspur Devices Lab'`;
    expect(lab.plan).toBe("lab");
    const roles = await sql`select u.email, m.role from memberships m join users u on u.id = m.user_id where m.workspace_id = ${lab.id} order by u.email`;
    expect(roles.map((r) => `${r.email}:${r.role}`)).toContain("owner@larkspur.example:owner");
    expect(roles.filter((r) => r.role === "researcher")).toHaveLength(2);
    const nets = await sql`select count(*)::int as n from networks where workspace_id = ${lab.id}`;
    expect(nets[0].n).toBeGreaterThanOrEqual(3);
  });
});

describe("queue", () => {
  it("a job enqueued on the system queue is completed by the worker process", async () => {
    const result = await pingWorker({ hello: "network" });
    expect(result.pong).toBe(true);
    expect(result.echo).toEqual({ hello: "network" });
    expect(result.workerPid).not.toBe(process.pid);
  });
});

describe("GET /api/v1/health", () => {
  it("reports database and queue ok without authentication", async () => {
    const res = await fetch(new URL("/api/v1/health", appUrl()));
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.status).toBe("ok");
    expect(body.database.status).toBe("ok");
    expect(body.queue.status).toBe("ok");
    expect(typeof body.database.latencyMs).toBe("number");
  });
});
