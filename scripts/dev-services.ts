/**
 * Local fakes of the hosted services, started with the app in development and in tests:
 * an OAuth2/OpenID provider (scripts/fake-oidc.ts) and an SMTP catcher
 * (scripts/fake-smtp.ts). Each returns the environment the app needs to reach it. With
 * the real services configured (OIDC_ISSUER / SMTP_URL in the environment) that fake
 * is not started.
 *
 * The stand-ins a person can reach through the app (the sign-on provider, which lets anyone
 * pick any identity, and the mailbox page) run only when `standins` is true: always in
 * development and tests, in the production server only when DEV_STANDINS=1 says so
 * (standInsWanted). Without them the SMTP catcher still keeps mail on disk, unread by the app.
 */
import { resolve } from "node:path";
import { rmSync } from "node:fs";
import { projectRoot } from "./env";
import { freePort } from "./ports";
import { startFakeOidc, FAKE_IDENTITIES } from "./fake-oidc";
import { startFakeSmtp } from "./fake-smtp";

export interface DevServices {
  /** Variables the app process needs to reach the fakes. */
  env: Record<string, string>;
  /** Lines to print for the person starting the app. */
  notes: string[];
  stop(): Promise<void>;
}

/**
 * Whether the stand-ins reachable through the app run: in development unless DEV_STANDINS=0,
 * in the production server only with DEV_STANDINS=1.
 */
export function standInsWanted(dev: boolean, setting: string | undefined): boolean {
  return dev ? setting !== "0" : setting === "1";
}

export async function startDevServices(opts: { log?: (line: string) => void; appUrl: string; databaseUrl: string; standins: boolean }): Promise<DevServices> {
  const env: Record<string, string> = { DEV_STANDINS: opts.standins ? "1" : "0" };
  const notes: string[] = [];
  const stops: Array<() => Promise<void>> = [];
  // Test runs (databases named saddlebook_t_…) get a mail folder of their own, removed afterwards.
  const throwaway = /saddlebook_t_/.test(opts.databaseUrl);
  try {
    if (!process.env.OIDC_ISSUER && opts.standins) {
      const oidc = await startFakeOidc({ port: await freePort() });
      stops.push(oidc.stop);
      Object.assign(env, {
        OIDC_ISSUER: oidc.issuer,
        OIDC_CLIENT_ID: oidc.clientId,
        OIDC_CLIENT_SECRET: oidc.clientSecret,
        OIDC_PROVIDER_NAME: "the local sign-in provider",
      });
      notes.push(`Single sign-on: local provider at ${oidc.issuer} (choose any of ${FAKE_IDENTITIES.length} identities).`);
    } else if (process.env.OIDC_ISSUER) {
      notes.push(`Single sign-on: ${process.env.OIDC_ISSUER}`);
    } else {
      notes.push("Single sign-on: off (no OIDC_ISSUER; the local stand-in provider runs only with DEV_STANDINS=1).");
    }
    if (!process.env.SMTP_URL) {
      const port = await freePort();
      const appPort = new URL(opts.appUrl).port || "80";
      const dir = resolve(projectRoot, ".data/mail", throwaway ? `test-${appPort}-${port}` : `app-${appPort}`);
      const smtp = await startFakeSmtp({ port, dir });
      stops.push(async () => {
        await smtp.stop();
        if (throwaway) rmSync(dir, { recursive: true, force: true });
      });
      Object.assign(env, { SMTP_URL: `smtp://127.0.0.1:${port}`, MAIL_CATCHER_DIR: dir });
      notes.push(
        opts.standins
          ? `Mail: caught locally (nothing is delivered); an admin reads it at ${opts.appUrl}/dev/mailbox`
          : `Mail: no SMTP_URL, so nothing is delivered; messages are kept in ${dir} (DEV_STANDINS=1 lets an admin read them in the app).`,
      );
    }
  } catch (e) {
    for (const s of stops.reverse()) await s().catch(() => {});
    throw e;
  }
  return {
    env,
    notes,
    async stop() {
      for (const s of stops.reverse()) await s().catch(() => {});
    },
  };
}
