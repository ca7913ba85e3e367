import { hash, verify } from "@node-rs/argon2";

// argon2id with the OWASP Password Storage Cheat Sheet's first recommended setting
// (19 MiB memory, 2 iterations, 1 lane). Parameters are stored in each hash, so
// raising them later keeps old hashes verifiable.
const options = { algorithm: 2 /* Algorithm.Argon2id: a const enum, not importable here */, memoryCost: 19_456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, options);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

// Compared against when the e-mail is unknown, so a wrong address costs as long as a wrong password.
let dummyHash: Promise<string> | undefined;
export async function burnPasswordCheck(password: string) {
  dummyHash ??= hashPassword("blindcut-timing-equalizer");
  await verifyPassword(await dummyHash, password);
}
