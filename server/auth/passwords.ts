// argon2id through @node-rs/argon2 (a prebuilt binary that loads on this machine; see STACK.md).
// Parameters are the library's defaults (19 MiB, t = 2, p = 1), which follow OWASP's
// password-storage recommendation for argon2id.
import { hash, verify } from '@node-rs/argon2';

export function hashPassword(password: string): Promise<string> {
  return hash(password);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}
