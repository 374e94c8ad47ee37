import request from "supertest";

// The usual next-auth CSRF sign-in flow, as scripts use it: fetch the token, post the credentials,
// keep the session cookie in the agent.
export const BASE_URL = process.env.TEST_BASE_URL ?? "http://127.0.0.1:3100";
export const DEMO_PASSWORD = "halftrip-demo";

export type Agent = ReturnType<typeof request.agent>;

export async function signInAgent(email: string, password = DEMO_PASSWORD): Promise<{ agent: Agent; status: number }> {
  const agent = request.agent(BASE_URL);
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

export const anonymous = () => request(BASE_URL);
