import { describe, expect, it } from "vitest";
import { nginxConf, SOCKET_IDLE_S } from "./nginx";

const base = {
  listen: "127.0.0.1:8080",
  nodes: ["127.0.0.1:4711", "127.0.0.1:4712", "127.0.0.1:4713"],
  prefix: "/tmp/fretcall-nginx",
};

/** One named block (an upstream or a location; neither nests another), up to its closing brace. */
function block(conf: string, opening: string) {
  const start = conf.indexOf(`${opening} {`);
  expect(start, `no block "${opening}"`).toBeGreaterThanOrEqual(0);
  return conf.slice(start, conf.indexOf("}", start));
}

describe("nginxConf", () => {
  const conf = nginxConf(base);

  it("hashes the room upstream on the room code, consistently, and spreads the other over every node", () => {
    const rooms = block(conf, "upstream fretcall_rooms");
    expect(rooms).toContain("hash $fretcall_room consistent;");
    const any = block(conf, "upstream fretcall_any");
    expect(any).not.toContain("hash");
    for (const upstream of [rooms, any]) {
      for (const node of base.nodes) expect(upstream).toContain(`server ${node} max_fails=1 fail_timeout=5s;`);
    }
  });

  it("takes the room code from the socket's query, the socket's path and the pad's page", () => {
    expect(conf).toMatch(/map \$arg_room \$fretcall_room \{\s+"" \$fretcall_room_in_path;\s+default \$arg_room;/);
    expect(conf).toContain("~^/ws/(?<code>[^/]+)/?$ $code;");
    expect(conf).toContain("~^/play/(?<code>[^/]+)/?$ $code;");
    expect(block(conf, "location ~ ^/(ws|play/)")).toContain("proxy_pass http://fretcall_rooms;");
    expect(block(conf, "location /")).toContain("proxy_pass http://fretcall_any;");
  });

  it("passes WebSocket upgrades, the Host and the client's address, and keeps sockets open past the heartbeat", () => {
    const ws = block(conf, "location ~ ^/(ws|play/)");
    expect(ws).toContain("proxy_set_header Upgrade $http_upgrade;");
    expect(ws).toContain("proxy_set_header Connection $fretcall_connection;");
    expect(ws).toContain("proxy_set_header Host $http_host;");
    expect(ws).toContain("proxy_set_header X-Forwarded-For $proxy_add_x_forwarded_for;");
    expect(ws).toContain(`proxy_read_timeout ${SOCKET_IDLE_S}s;`);
    // The nodes ping every socket every 15 s (server/sockets.ts HEARTBEAT_MS): well inside the idle limit.
    expect(SOCKET_IDLE_S).toBeGreaterThanOrEqual(2 * 15);
    expect(conf).toContain("proxy_next_upstream error timeout;");
  });

  it("keeps nginx's temporary files under its prefix and listens where asked", () => {
    for (const temp of ["client_body", "proxy", "fastcgi", "uwsgi", "scgi"]) expect(conf).toContain(`${temp}_temp_path /tmp/fretcall-nginx/${temp};`);
    expect(conf).toContain("listen 127.0.0.1:8080;");
    expect(nginxConf({ ...base, listen: 80 })).toContain("listen 80;");
    expect(nginxConf({ ...base, failTimeoutS: 2 })).toContain("server 127.0.0.1:4711 max_fails=1 fail_timeout=2s;");
  });

  it.each([
    [{ nodes: [] }, /at least one node/],
    [{ nodes: ["127.0.0.1:4711; include /etc/passwd"] }, /host:port/],
    [{ nodes: ["localhost"] }, /host:port/],
    [{ listen: "0.0.0.0:80 default_server" }, /host:port/],
    [{ prefix: "/tmp/a b" }, /plain path/],
  ])("refuses %j", (bad, message) => {
    expect(() => nginxConf({ ...base, ...bad })).toThrow(message);
  });

  it("accepts host names and IPv6 addresses", () => {
    expect(nginxConf({ ...base, nodes: ["node-a.internal:3000", "[::1]:3001"] })).toContain("server [::1]:3001 max_fails=1");
  });
});
