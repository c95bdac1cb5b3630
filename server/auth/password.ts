import argon2 from "argon2";

// argon2id with the OWASP-recommended minimum (19 MiB, t=2, p=1): about 50 ms here.
const OPTIONS = { type: argon2.argon2id, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export const hashPassword = (password: string) => argon2.hash(password, OPTIONS);

export async function verifyPassword(hash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}

// Used when the account does not exist, so sign-in takes the same time either way.
let dummyHash: Promise<string> | null = null;
export function dummyVerify(password: string): Promise<boolean> {
  dummyHash ??= hashPassword("a password nobody has");
  return dummyHash.then((h) => verifyPassword(h, password + "x"));
}
