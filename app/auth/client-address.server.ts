/**
 * The address a request came from, for the audit log and per-address rate limits.
 *
 * The app server listens on 127.0.0.1 only, so a request without a proxy header comes
 * from this machine. Behind a reverse proxy, the proxy appends the client's address to
 * X-Forwarded-For; with TRUST_PROXY_HOPS=n (default 1) the n-th entry from the right is
 * taken, which a client cannot forge by sending its own header. TRUST_PROXY_HOPS=0
 * ignores the header.
 */
export function clientAddress(request: Request): string {
  const hops = Number(process.env.TRUST_PROXY_HOPS ?? "1");
  const xff = request.headers.get("x-forwarded-for");
  if (xff && Number.isInteger(hops) && hops > 0) {
    const parts = xff.split(",").map((p) => p.trim()).filter(Boolean);
    const pick = parts[parts.length - hops] ?? parts[0];
    if (pick) return pick.slice(0, 64);
  }
  return "127.0.0.1";
}
