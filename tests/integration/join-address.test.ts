import { networkInterfaces } from "node:os";
import QRCode from "qrcode";
import { afterAll, describe, expect, it } from "vitest";
import { DEMO_SCHOOL } from "~/demo/school";
import { joinAddress } from "~/lib/joinAddress";
import { openTestRoom } from "../../server/scripted-rooms";
import { seedDemo } from "../../server/seed";
import { signedIn, startTestServer, type TestServer } from "./harness";

// Nothing is ever sent to the join address: the tests only read the page the stage gets.
const servers: TestServer[] = [];
afterAll(() => Promise.all(servers.map((s) => s.close())));

async function stagePage(extra: Record<string, string> = {}) {
  const server = await startTestServer(extra);
  servers.push(server);
  await seedDemo(server.services.db);
  const room = await openTestRoom(server.services.db);
  const teacher = await signedIn(server.url, DEMO_SCHOOL.teachers[0].email);
  const res = await teacher.get(`/stage/${room.id}`);
  expect(res.status).toBe(200);
  return { server, room, page: await res.text() };
}

/** The dark modules of the QR code for a link, as the SVG path the stage draws. */
async function qrPathOf(link: string) {
  const svg = await QRCode.toString(link, { type: "svg", margin: 1 });
  return svg.match(/<path stroke="[^"]*" d="([^"]+)"/)![1]!;
}

describe("the join link on the stage", () => {
  it("uses PUBLIC_URL when it is set: link, QR code and the words beside it", async () => {
    const { room, page } = await stagePage({ PUBLIC_URL: "https://fretcall.school.example" });
    expect(page).toContain("https://fretcall.school.example/join");
    expect(page).toContain(await qrPathOf(`https://fretcall.school.example/join?code=${room.code}`));
    expect(page).toMatch(/The QR code opens fretcall\.school\.example, the address set in PUBLIC_URL/);
    expect(page).not.toContain(`localhost/join`);
  });

  it("does not project the loopback address the stage was opened at", async () => {
    const { server, room, page } = await stagePage();
    const chosen = joinAddress({ publicUrl: undefined, requestUrl: server.url, interfaces: networkInterfaces() });
    expect(page).toContain(await qrPathOf(`${chosen.origin}/join?code=${room.code}`));
    if (chosen.via === "localhost-only") expect(page).toMatch(/Only this computer can open/);
    else expect(chosen.origin).not.toMatch(/localhost|127\.0\.0\.1/);
  });
});
