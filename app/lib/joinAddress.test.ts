import type { NetworkInterfaceInfo } from "node:os";
import { describe, expect, it } from "vitest";
import { joinAddress, joinAddressNote, localNetworkAddress, type Interfaces } from "./joinAddress";

const v4 = (address: string, internal = false): NetworkInterfaceInfo => ({
  address,
  family: "IPv4",
  internal,
  netmask: "255.255.255.0",
  mac: "00:00:00:00:00:00",
  cidr: `${address}/24`,
});
const v6 = (address: string, internal = false): NetworkInterfaceInfo => ({
  address,
  family: "IPv6",
  internal,
  netmask: "ffff:ffff:ffff:ffff::",
  mac: "00:00:00:00:00:00",
  cidr: `${address}/64`,
  scopeid: 0,
});
const loopback: Interfaces = { lo: [v4("127.0.0.1", true), v6("::1", true)] };

describe("localNetworkAddress", () => {
  it.each<[string, Interfaces, string | undefined]>([
    ["loopback only", loopback, undefined],
    ["one Wi-Fi address", { ...loopback, wlan0: [v4("192.168.1.20"), v6("fe80::1c2b:3cff:fe4d:5e6f")] }, "192.168.1.20"],
    [
      "several: the private range a school network uses, skipping container bridges and link-local",
      {
        ...loopback,
        docker0: [v4("192.168.0.1")],
        "br-3f2a": [v4("192.168.49.1")],
        eth1: [v4("169.254.10.2")],
        eth0: [v4("172.20.4.7")],
        wlan0: [v4("10.4.0.33")],
      },
      "10.4.0.33",
    ],
    ["several in the same range: the first by interface name, whatever the order given", { wlan1: [v4("192.168.5.9")], eth0: [v4("192.168.1.40")] }, "192.168.1.40"],
    ["a public IPv4 address before IPv6", { eth0: [v6("2001:db8::5")], eth1: [v4("203.0.113.9")] }, "203.0.113.9"],
    ["IPv6 only: bracketed, never the link-local one", { ...loopback, wlan0: [v6("fe80::1"), v6("fd12:3456::20")] }, "[fd12:3456::20]"],
  ])("%s", (_, interfaces, expected) => {
    expect(localNetworkAddress(interfaces)).toBe(expected);
  });
});

describe("joinAddress", () => {
  const wifi: Interfaces = { ...loopback, wlan0: [v4("192.168.1.20")] };

  it("uses PUBLIC_URL when it is set, wherever the stage was opened", () => {
    const chosen = joinAddress({ publicUrl: "https://fretcall.school.example/", requestUrl: "http://localhost:3000/stage/r1", interfaces: wifi });
    expect(chosen).toEqual({ origin: "https://fretcall.school.example", via: "public-url" });
    expect(joinAddressNote(chosen)).toMatch(/fretcall\.school\.example.*PUBLIC_URL/);
  });

  it("keeps the stage's own address when it is not loopback", () => {
    expect(joinAddress({ publicUrl: undefined, requestUrl: "http://192.168.1.20:3000/stage/r1", interfaces: wifi })).toEqual({
      origin: "http://192.168.1.20:3000",
      via: "this-address",
    });
  });

  it.each(["http://localhost:3000/stage/r1", "http://127.0.0.1:3000/stage/r1", "http://[::1]:3000/stage/r1"])(
    "swaps a loopback stage (%s) for the local network address, keeping scheme and port",
    (requestUrl) => {
      const chosen = joinAddress({ publicUrl: undefined, requestUrl, interfaces: wifi });
      expect(chosen).toEqual({ origin: "http://192.168.1.20:3000", via: "local-network" });
      expect(joinAddressNote(chosen)).toMatch(/192\.168\.1\.20:3000.*same network/);
    },
  );

  it("stays on localhost when there is nothing else, and says the phones cannot join", () => {
    const chosen = joinAddress({ publicUrl: undefined, requestUrl: "http://localhost:3000/stage/r1", interfaces: loopback });
    expect(chosen).toEqual({ origin: "http://localhost:3000", via: "localhost-only" });
    expect(joinAddressNote(chosen)).toMatch(/Only this computer.*PUBLIC_URL/);
  });

  it("brackets an IPv6-only network address in the origin", () => {
    const chosen = joinAddress({ publicUrl: undefined, requestUrl: "http://localhost:3000/", interfaces: { wlan0: [v6("fd12:3456::20")] } });
    expect(chosen.origin).toBe("http://[fd12:3456::20]:3000");
  });
});
