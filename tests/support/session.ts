import request from "supertest";

// The usual next-auth CSRF sign-in flow, as scripts use it: fetch the token, post the credentials,
// keep the session cookie in the agent.
export const BASE_URL = process.env.TEST_BASE_URL ?? "http://127.0.0.1:3100";
export const DEMO_PASSWORD = "demo-tanks-and-bays";

export type Agent = ReturnType<typeof request.agent>;

/**
 * A client that, like our own pages, sends the Origin header: the management API refuses state-changing
 * requests without a same-origin Origin (or Sec-Fetch-Site) as cross-site.
 */
export const sameOriginAgent = (): Agent => request.agent(BASE_URL).set("Origin", new URL(BASE_URL).origin);

/**
 * Signs in through next-auth's form. `address` stands for the client's address (X-Forwarded-For, which the
 * test server trusts with no proxy in front), so throttling tests keep their failures to themselves.
 */
export async function signInAgent(email: string, password = DEMO_PASSWORD, address?: string): Promise<{ agent: Agent; status: number }> {
  const agent = sameOriginAgent();
  if (address) agent.set("X-Forwarded-For", address);
  const csrf = await agent.get("/api/auth/csrf").expect(200);
  const res = await agent
    .post("/api/auth/callback/credentials")
    .type("form")
    .send({ csrfToken: csrf.body.csrfToken, email, password, json: "true" });
  return { agent, status: res.status };
}

export async function signedIn(email: string, password = DEMO_PASSWORD): Promise<Agent> {
  const { agent } = await signInAgent(email, password);
  const session = await agent.get("/api/auth/session");
  if (!session.body?.user?.id) throw new Error(`sign-in failed for ${email}`);
  return agent;
}

export const anonymous = () => sameOriginAgent();

const cookiePairs = (setCookie: string[] | string | undefined) => ([] as string[]).concat(setCookie ?? []).map((c) => c.split(";")[0]);

/** Signs in without an agent and answers the Cookie header a copied session would carry. */
export async function sessionCookie(email: string, password = DEMO_PASSWORD): Promise<string> {
  const csrf = await request(BASE_URL).get("/api/auth/csrf").expect(200);
  const csrfCookies = cookiePairs(csrf.headers["set-cookie"]);
  const res = await request(BASE_URL)
    .post("/api/auth/callback/credentials")
    .set("Origin", new URL(BASE_URL).origin)
    .set("Cookie", csrfCookies.join("; "))
    .type("form")
    .send({ csrfToken: csrf.body.csrfToken, email, password, json: "true" });
  const session = cookiePairs(res.headers["set-cookie"]).find((c) => c.includes("session-token="));
  if (!session) throw new Error(`sign-in failed for ${email}: ${res.status}`);
  return session;
}
