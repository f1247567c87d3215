import bcrypt from 'bcryptjs';
import { compareOffThread } from '../auth/hash-workers';

/** bcrypt cost: 10 is the library's default and keeps a sign-in near 100 ms in pure JS. */
export const BCRYPT_COST = 10;

export const hashSecret = (plain: string, cost = BCRYPT_COST): Promise<string> => bcrypt.hash(plain, cost);
// checks run on worker threads, so a flood of wrong passwords does not hold the event loop
export const checkSecret = (plain: string, hash: string): Promise<boolean> => compareOffThread(plain, hash);

// compared against when the account does not exist, so timing does not tell which e-mails are registered
const DUMMY_HASH = bcrypt.hashSync('no-such-account', BCRYPT_COST);
export const checkAgainstDummy = (plain: string): Promise<boolean> => compareOffThread(plain, DUMMY_HASH);
