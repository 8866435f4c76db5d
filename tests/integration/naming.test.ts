import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { organisations } from "~/db/schema";
import { DEMO_SCHOOL } from "~/demo/school";
import { seedDemo } from "../../server/seed";
import { Client, signedIn, startTestServer, type TestServer } from "./harness";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const school = async () => (await server.services.db.select().from(organisations).where(eq(organisations.id, DEMO_SCHOOL.id)))[0]!.noteNaming;
// React separates interpolated text with <!-- --> in server HTML.
const page = async (client: Client, path: string) => (await (await client.get(path)).text()).replace(/<!-- -->/g, "").replace(/&#x27;/g, "'");

describe("the school's note naming", () => {
  it("is letters until the admin picks another; then the school's pages are rendered in it", async () => {
    const student = await signedIn(server.url, DEMO_SCHOOL.studentWithSignIn.email);
    expect(await school()).toBe("letters");
    expect(await page(student, "/explore?note=Bb4")).toContain("Written B♭4");

    const admin = await signedIn(server.url, DEMO_SCHOOL.admin.email);
    const saved = await admin.post("/admin", { intent: "setNaming", naming: "german" });
    expect(saved.status).toBe(200);
    expect(await saved.text()).toContain("Notes are now named German");
    expect(await school()).toBe("german");
    // German: B♭ is B, B natural is H (app/music/naming.ts).
    expect(await page(student, "/explore?note=Bb4")).toContain("Written B4");
    expect(await page(student, "/explore?note=B4")).toContain("Written H4");
    // Nobody signed in sees no school's choice.
    expect(await page(new Client(server.url), "/explore?note=B4")).toContain("Written B4");
    await admin.post("/admin", { intent: "setNaming", naming: "letters" });
  });

  it("refuses an unknown naming with a clear message and changes nothing", async () => {
    const admin = await signedIn(server.url, DEMO_SCHOOL.admin.email);
    const res = await admin.post("/admin", { intent: "setNaming", naming: "klingon" });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("Choose one of the three namings.");
    expect(await school()).toBe("letters");
  });

  it("is the admin's to change: a teacher gets 403", async () => {
    const teacher = await signedIn(server.url, DEMO_SCHOOL.teachers[0].email);
    expect((await teacher.post("/admin", { intent: "setNaming", naming: "solfege" })).status).toBe(403);
    expect(await school()).toBe("letters");
  });
});
