// Password hashing (bcrypt). Pure Node: used by sign-in, invitations and the seed alike.
import bcrypt from "bcryptjs";

const COST = 11;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

// A real hash of a random password at the same cost: unknown addresses are checked against it, so a
// failed sign-in takes as long whether or not the address has an account.
let decoy: Promise<string> | undefined;
export function decoyPasswordHash(): Promise<string> {
  decoy ??= hashPassword(crypto.randomUUID());
  return decoy;
}
