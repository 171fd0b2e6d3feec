// In-memory state of the sign-in stand-in, saved to a JSON file after every change so a restart
// of `npm start` keeps the people who signed up. Development and tests only.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname } from "node:path";
import { randomBytes } from "node:crypto";
import { DEMO_LAB, DEMO_PEOPLE } from "../../src/server/demo/scenario";

export interface FakeUser {
  id: string;
  email: string;
  emailId: string;
  firstName: string;
  lastName: string;
  password: string;
  createdAt: number;
  updatedAt: number;
  lastSignInAt: number | null;
}
export interface FakeOrg {
  id: string;
  name: string;
  slug: string;
  createdBy: string | null;
  createdAt: number;
  updatedAt: number;
}
export interface FakeMembership {
  id: string;
  orgId: string;
  userId: string;
  /** Clerk role key, e.g. `org:researcher`. */
  role: string;
  createdAt: number;
  updatedAt: number;
}
export interface FakeSession {
  id: string;
  clientId: string;
  userId: string;
  status: "active" | "ended" | "removed";
  lastActiveOrgId: string | null;
  createdAt: number;
  updatedAt: number;
}
export interface FakeSignIn {
  id: string;
  identifier: string;
  userId: string | null;
  status: "needs_identifier" | "needs_first_factor" | "complete";
  createdSessionId: string | null;
}
export interface FakeSignUp {
  id: string;
  email: string | null;
  firstName: string | null;
  lastName: string | null;
  password: string | null;
  status: "missing_requirements" | "complete";
  createdUserId: string | null;
  createdSessionId: string | null;
}
export interface FakeClient {
  id: string;
  sessionIds: string[];
  lastActiveSessionId: string | null;
  signIn: FakeSignIn | null;
  signUp: FakeSignUp | null;
  /** Unix seconds of the last sign-in or sign-out: the `__client_uat` cookie value. */
  uat: number;
  createdAt: number;
  updatedAt: number;
}

export interface State {
  users: FakeUser[];
  orgs: FakeOrg[];
  memberships: FakeMembership[];
  sessions: FakeSession[];
  clients: FakeClient[];
}

export const ROLE_TO_CLERK: Record<string, string> = {
  owner: "org:owner",
  billing_admin: "org:billing_admin",
  researcher: "org:researcher",
  viewer: "org:viewer",
};

export function newId(prefix: string): string {
  return `${prefix}_${randomBytes(12).toString("hex")}`;
}

const nowMs = () => Date.now();

function seeded(): State {
  const t = nowMs();
  const users: FakeUser[] = DEMO_PEOPLE.map((p) => {
    const [firstName, ...rest] = p.name.split(" ");
    return {
      id: p.clerkUserId,
      email: p.email,
      emailId: `idn_${p.clerkUserId}`,
      firstName,
      lastName: rest.join(" "),
      password: p.password,
      createdAt: t,
      updatedAt: t,
      lastSignInAt: null,
    };
  });
  const org: FakeOrg = { id: DEMO_LAB.clerkOrgId, name: DEMO_LAB.name, slug: DEMO_LAB.slug, createdBy: "user_demo_owner", createdAt: t, updatedAt: t };
  const memberships: FakeMembership[] = DEMO_LAB.members.map((m) => {
    const person = DEMO_PEOPLE.find((p) => p.key === m.key)!;
    return { id: `orgmem_demo_${m.key}`, orgId: org.id, userId: person.clerkUserId, role: ROLE_TO_CLERK[m.role], createdAt: t, updatedAt: t };
  });
  return { users, orgs: [org], memberships, sessions: [], clients: [] };
}

export class Store {
  state: State;
  constructor(private readonly file: string | undefined) {
    this.state = file && existsSync(file) ? (JSON.parse(readFileSync(file, "utf8")) as State) : seeded();
    this.ensureDemo();
    this.save();
  }

  /** The demo people and lab always exist (a saved file from an older run may lack some). */
  private ensureDemo() {
    const base = seeded();
    for (const u of base.users) if (!this.state.users.some((x) => x.id === u.id)) this.state.users.push(u);
    for (const o of base.orgs) if (!this.state.orgs.some((x) => x.id === o.id)) this.state.orgs.push(o);
    for (const m of base.memberships) if (!this.state.memberships.some((x) => x.orgId === m.orgId && x.userId === m.userId)) this.state.memberships.push(m);
  }

  save() {
    if (!this.file) return;
    mkdirSync(dirname(this.file), { recursive: true });
    writeFileSync(this.file, JSON.stringify(this.state));
  }

  user(id: string) {
    return this.state.users.find((u) => u.id === id);
  }
  userByEmail(email: string) {
    const e = email.trim().toLowerCase();
    return this.state.users.find((u) => u.email.toLowerCase() === e);
  }
  org(id: string) {
    return this.state.orgs.find((o) => o.id === id);
  }
  session(id: string) {
    return this.state.sessions.find((s) => s.id === id);
  }
  client(id: string | undefined) {
    return id ? this.state.clients.find((c) => c.id === id) : undefined;
  }
  membershipsOfUser(userId: string) {
    return this.state.memberships.filter((m) => m.userId === userId);
  }
  membershipsOfOrg(orgId: string) {
    return this.state.memberships.filter((m) => m.orgId === orgId);
  }
  membership(orgId: string, userId: string) {
    return this.state.memberships.find((m) => m.orgId === orgId && m.userId === userId);
  }

  newClient(): FakeClient {
    const t = nowMs();
    const c: FakeClient = { id: newId("client"), sessionIds: [], lastActiveSessionId: null, signIn: null, signUp: null, uat: 0, createdAt: t, updatedAt: t };
    this.state.clients.push(c);
    this.save();
    return c;
  }

  createUser(input: { email: string; password: string | null; firstName: string; lastName: string }): FakeUser {
    const t = nowMs();
    const id = newId("user");
    const u: FakeUser = {
      id,
      email: input.email.trim().toLowerCase(),
      emailId: newId("idn"),
      firstName: input.firstName,
      lastName: input.lastName,
      password: input.password ?? randomBytes(16).toString("hex"),
      createdAt: t,
      updatedAt: t,
      lastSignInAt: null,
    };
    this.state.users.push(u);
    this.save();
    return u;
  }

  startSession(client: FakeClient, userId: string): FakeSession {
    const t = nowMs();
    const s: FakeSession = { id: newId("sess"), clientId: client.id, userId, status: "active", lastActiveOrgId: null, createdAt: t, updatedAt: t };
    this.state.sessions.push(s);
    client.sessionIds = [s.id];
    client.lastActiveSessionId = s.id;
    client.uat = Math.floor(t / 1000);
    client.updatedAt = t;
    const u = this.user(userId);
    if (u) u.lastSignInAt = t;
    this.save();
    return s;
  }

  endSessions(client: FakeClient) {
    for (const sid of client.sessionIds) {
      const s = this.session(sid);
      if (s) s.status = "ended";
    }
    client.sessionIds = [];
    client.lastActiveSessionId = null;
    client.signIn = null;
    client.signUp = null;
    client.uat = Math.floor(nowMs() / 1000);
    this.save();
  }
}
