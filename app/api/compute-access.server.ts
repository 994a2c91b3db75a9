/**
 * Who may call the stateless compute endpoints (/api/v1/rates, /api/v1/simulate).
 * Every request is currently allowed: the endpoints read and store nothing. Once sign-in
 * exists this delegates to the API authentication module, and each compute route calls it
 * exactly once, so the change is made here alone. A refusal is a thrown Response.
 */
export async function computeAccess(_request: Request): Promise<void> {}
