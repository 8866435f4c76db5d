/**
 * Which address the stage projects for the class's phones to join at. A stage opened at
 * `localhost` must not project `localhost`: no phone can reach it. Pure, so it is tested over
 * made-up interface lists; the callers pass `os.networkInterfaces()`.
 */
import type { NetworkInterfaceInfo } from "node:os";

export type Interfaces = Record<string, NetworkInterfaceInfo[] | undefined>;

export interface JoinAddress {
  /** Origin for the join link and QR code, e.g. `http://192.168.1.20:3000`. */
  origin: string;
  /**
   * public-url: PUBLIC_URL was set; this-address: the stage's own address, which the phones can
   * reach too; local-network: the stage is on loopback, so this machine's address on the local
   * network; localhost-only: no such address, so the phones cannot join.
   */
  via: "public-url" | "this-address" | "local-network" | "localhost-only";
}

const isLoopbackHost = (hostname: string) =>
  hostname === "localhost" || hostname.endsWith(".localhost") || /^127\./.test(hostname) || hostname === "[::1]";

// Containers', VMs' and VPNs' own interfaces: no phone on the classroom Wi-Fi is on them.
const VIRTUAL = /^(docker|br-|veth|virbr|vmnet|vboxnet|cni|flannel|podman|lxc|lxd|tun|tap|utun|wg|zt|tailscale)/i;

/** Lower is better: the private IPv4 ranges a school network uses, then other IPv4, then IPv6. */
function rank(a: NetworkInterfaceInfo) {
  if (a.family === "IPv6") return 4;
  if (a.address.startsWith("192.168.")) return 0;
  if (a.address.startsWith("10.")) return 1;
  if (/^172\.(1[6-9]|2\d|3[01])\./.test(a.address)) return 2;
  return 3;
}

/** This machine's address on the local network, or undefined when it has none (loopback only). */
export function localNetworkAddress(interfaces: Interfaces): string | undefined {
  const candidates = Object.entries(interfaces)
    .filter(([name]) => !VIRTUAL.test(name))
    .flatMap(([name, infos]) => (infos ?? []).map((info) => ({ name, info })))
    .filter(({ info }) => !info.internal && !/^169\.254\./.test(info.address) && !/^fe[89ab][0-9a-f]:/i.test(info.address))
    // Sorted on rank, then name and address, so the same machine always projects the same address.
    .sort((x, y) => rank(x.info) - rank(y.info) || x.name.localeCompare(y.name) || x.info.address.localeCompare(y.info.address));
  const best = candidates[0]?.info;
  if (!best) return undefined;
  return best.family === "IPv6" ? `[${best.address}]` : best.address;
}

/** The join origin: PUBLIC_URL when set, else the stage's own origin unless that is loopback. */
export function joinAddress(opts: { publicUrl: string | undefined; requestUrl: string; interfaces: Interfaces }): JoinAddress {
  if (opts.publicUrl) return { origin: new URL(opts.publicUrl).origin, via: "public-url" };
  const here = new URL(opts.requestUrl);
  if (!isLoopbackHost(here.hostname)) return { origin: here.origin, via: "this-address" };
  const local = localNetworkAddress(opts.interfaces);
  if (!local) return { origin: here.origin, via: "localhost-only" };
  return { origin: `${here.protocol}//${local}${here.port ? `:${here.port}` : ""}`, via: "local-network" };
}

/** The words beside the QR code: which address it holds, and why. */
export function joinAddressNote({ origin, via }: JoinAddress): string {
  const host = new URL(origin).host;
  switch (via) {
    case "public-url":
      return `The QR code opens ${host}, the address set in PUBLIC_URL.`;
    case "this-address":
      return `The QR code opens ${host}, the address of this page.`;
    case "local-network":
      return `The QR code opens ${host}, this computer's address on the local network: phones must be on the same network.`;
    case "localhost-only":
      return `Only this computer can open ${host}: connect it to the class's network (or set PUBLIC_URL) so phones can join.`;
  }
}
