import bcrypt from "bcryptjs";

// bcrypt cost 11: about 100 ms per hash on this class of machine (common practice: tune to ~100 ms).
const COST = 11;

export const hashPassword = (password: string) => bcrypt.hash(password, COST);
export const verifyPassword = (password: string, hash: string) => bcrypt.compare(password, hash);

// A hash to compare against when the e-mail is unknown, so both paths take the same time.
let dummy: Promise<string> | null = null;
export const burnPasswordCheck = async (password: string) => {
  dummy ??= bcrypt.hash("no account has this password", COST);
  await bcrypt.compare(password, await dummy);
  return false;
};
