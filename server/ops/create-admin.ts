/**
 * `npm run create-admin -- --email E --name N`: the first administrator of a new installation (or another one,
 * say after the last one left), on the configured database (DATA_DIR / DATABASE_URL, as for the server).
 * A production install has no demo accounts, so without this nobody could sign in to create the rest.
 *
 * The password is read from standard input (one line; typed without echo on a terminal) so it never appears
 * in the shell's history or the process list, and must pass the same rules as a password set in the app.
 * Migrations run first, so this works on an empty database before the server has ever started.
 */
import readline from 'node:readline';
import { parseArgs } from 'node:util';
import { z } from 'zod';
import { passwordProblem } from '../../shared/password-rules';
import { loadConfig } from '../config';
import { migrate } from '../db/migrate';
import { createSequelize } from '../db/sequelize';
import { createLogger } from '../logger';
import { initModels } from '../models';
import { createUser } from '../services/users';

const argsSchema = z.object({
  email: z.string().trim().toLowerCase().email('--email needs an e-mail address'),
  name: z.string().trim().min(1, '--name needs a name').max(120),
});

/** One line from stdin; on a terminal the typed characters are not echoed. */
function readPassword(prompt: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const tty = process.stdin.isTTY === true;
    const rl = readline.createInterface({ input: process.stdin, output: process.stderr, terminal: tty });
    if (tty) {
      process.stderr.write(prompt);
      // keep the prompt, hide what is typed
      (rl as unknown as { _writeToOutput: (s: string) => void })._writeToOutput = () => undefined;
    }
    let answered = false;
    rl.once('line', (line) => {
      answered = true;
      if (tty) process.stderr.write('\n');
      rl.close();
      resolve(line);
    });
    rl.once('close', () => {
      if (!answered) reject(new Error('no password on standard input'));
    });
  });
}

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } });
  const parsed = argsSchema.safeParse(values);
  if (!parsed.success) throw new Error(parsed.error.issues.map((i) => i.message).join('; '));
  const { email, name } = parsed.data;
  const password = await readPassword(`password for ${email} (at least 12 characters): `);
  const problem = passwordProblem(password, email);
  if (problem) throw new Error(`password: ${problem}`);

  const config = loadConfig();
  const log = createLogger(config.logLevel, 'create-admin');
  const sequelize = createSequelize(config, log);
  try {
    await migrate(sequelize, log);
    const user = await createUser(initModels(sequelize), { email, name, password, role: 'admin' });
    process.stdout.write(`administrator ${user.email} created (id ${user.id}); sign in and add the other users under Administration > Users\n`);
  } finally {
    await sequelize.close();
  }
}

main().catch((err: unknown) => {
  process.stderr.write(`create-admin failed: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
