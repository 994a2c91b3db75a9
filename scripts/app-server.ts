/** Starts the built app (scripts/serve.ts) or Vite's dev server as a child process. */
import { spawn, type ChildProcess } from "node:child_process";
import { resolve } from "node:path";
import { projectRoot } from "./env";
import { portAnswers } from "./ports";

export interface AppServer {
  url: string;
  child: ChildProcess;
  stop(): Promise<void>;
}

export async function startAppServer(opts: {
  port: number;
  env: Record<string, string>;
  dev?: boolean;
  quiet?: boolean;
}): Promise<AppServer> {
  const host = "127.0.0.1";
  // Development: Vite's server. Production: scripts/serve.ts (a supervisor and its worker
  // processes), run by Node itself so that the child is the supervisor and signals reach it.
  const bin = opts.dev ? resolve(projectRoot, "node_modules/.bin", "react-router") : process.execPath;
  const args = opts.dev ? ["dev", "--host", host, "--port", String(opts.port), "--strictPort"] : ["--import", "tsx", "scripts/serve.ts"];
  const child = spawn(bin, args, {
    cwd: projectRoot,
    env: {
      ...process.env,
      ...opts.env,
      HOST: host,
      PORT: String(opts.port),
      NODE_ENV: opts.dev ? "development" : "production",
    },
    // Its own process group: Ctrl-C reaches this script, which stops the server in order.
    detached: true,
    stdio: opts.quiet ? ["ignore", "ignore", "inherit"] : ["ignore", "inherit", "inherit"],
  });
  let exited = false;
  child.once("exit", () => {
    exited = true;
  });
  const url = `http://${host}:${opts.port}`;
  const deadline = Date.now() + 60_000;
  while (!(await portAnswers(opts.port, host))) {
    if (exited) throw new Error("The app server stopped while starting (see the messages above).");
    if (Date.now() > deadline) {
      try {
        process.kill(-child.pid!, "SIGKILL");
      } catch {
        child.kill("SIGKILL");
      }
      throw new Error("The app server did not answer within 60 s.");
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  return {
    url,
    child,
    stop: () =>
      new Promise<void>((done) => {
        if (exited) return done();
        child.once("exit", () => done());
        child.kill("SIGTERM");
        // Longer than the production server's own drain (10 s, then it kills its workers);
        // then the whole process group, so no worker outlives it.
        setTimeout(() => {
          if (exited) return;
          try {
            process.kill(-child.pid!, "SIGKILL");
          } catch {
            child.kill("SIGKILL");
          }
        }, 15_000).unref();
      }),
  };
}
