// A throw-away redis-server on a free loopback port (Debian's package; no persistence).
import net from "node:net";
import { spawn, type ChildProcess } from "node:child_process";

export interface RedisServer {
  url: string;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

export async function startRedis(): Promise<RedisServer> {
  const port = await freePort();
  const child: ChildProcess = spawn(
    "redis-server",
    ["--bind", "127.0.0.1", "--port", String(port), "--save", "", "--appendonly", "no"],
    { stdio: ["ignore", "pipe", "pipe"] },
  );
  let log = "";
  child.stdout?.on("data", (d: Buffer) => (log += d.toString()));
  child.stderr?.on("data", (d: Buffer) => (log += d.toString()));
  const deadline = Date.now() + 15_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`redis-server exited (${child.exitCode}):\n${log}`);
    const ok = await new Promise<boolean>((resolve) => {
      const s = net.connect(port, "127.0.0.1", () => {
        s.end();
        resolve(true);
      });
      s.on("error", () => resolve(false));
    });
    if (ok) break;
    if (Date.now() > deadline) throw new Error(`redis-server did not listen on ${port}:\n${log}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url: `redis://127.0.0.1:${port}`,
    async stop() {
      if (child.exitCode !== null) return;
      const exited = new Promise((r) => child.once("exit", r));
      child.kill("SIGTERM");
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
      if (child.exitCode === null) child.kill("SIGKILL");
    },
  };
}
