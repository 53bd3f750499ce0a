/**
 * Creates an administrator on the configured database, for a deployment that
 * starts without demo data:
 *
 *   npm run --silent admin:create -- --email ada@example.com --name "Ada Admin" < password.txt
 *
 * The password is read from standard input (typed without echo on a terminal),
 * never from the command line, where other users and the shell history would
 * see it. The database is migrated first, so this works on an empty one.
 * Exit codes: 0 created, 1 refused (the address is taken, the password is
 * weak), 2 bad usage or configuration. Every refusal is one line on stderr.
 */
import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import readline from 'node:readline';
import { Writable } from 'node:stream';
import pino from 'pino';
import { emailSchema } from '../shared/schemas/users';
import { passwordProblem } from '../server/auth/password-strength';
import { configurePasswordHashing, hashPassword } from '../server/auth/passwords';
import { ConfigError, loadConfig } from '../server/config';
import { connect } from '../server/db/connection';
import { migrate } from '../server/db/migrations';
import { initModels, User } from '../server/db/models';
import { createLogger, securityLog } from '../server/log';
import { hardenFiles } from '../server/startup';

export class Refusal extends Error {
  constructor(
    message: string,
    readonly exitCode: 1 | 2,
  ) {
    super(message);
  }
}

function readArgs(args: string[]) {
  let values: { email?: string; name?: string };
  try {
    ({ values } = parseArgs({ args, options: { email: { type: 'string' }, name: { type: 'string' } }, strict: true }));
  } catch (err) {
    throw new Refusal(`admin:create: ${(err as Error).message}. Usage: npm run admin:create -- --email ADDRESS --name "FULL NAME" (password on standard input)`, 2);
  }
  const email = emailSchema.safeParse(values.email ?? '');
  if (!email.success) throw new Refusal(`admin:create: --email ${values.email ? `"${values.email}" must be an e-mail address` : 'is required'}`, 2);
  const name = (values.name ?? '').trim();
  if (!name || name.length > 120) throw new Refusal(`admin:create: --name ${name ? 'must be at most 120 characters' : 'is required'}`, 2);
  return { email: email.data, name };
}

/** All of standard input (a pipe or a file), or one line typed on a terminal without echo. */
async function readPassword(): Promise<string> {
  if (!process.stdin.isTTY) {
    const chunks: Buffer[] = [];
    for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
    return Buffer.concat(chunks).toString('utf8').replace(/\r?\n$/, '');
  }
  process.stderr.write('Password for the new administrator: ');
  const silent = new Writable({ write: (_chunk, _enc, done) => done() });
  const rl = readline.createInterface({ input: process.stdin, output: silent, terminal: true });
  const line = await new Promise<string>((resolve) => rl.once('line', resolve));
  rl.close();
  process.stderr.write('\n');
  return line;
}

/**
 * The command without its process: arguments, a way to read the password, the
 * environment. Resolves with the line to print; rejects with a Refusal.
 */
export async function adminCreate(args: string[], password: () => Promise<string>, env: Record<string, string | undefined> = process.env): Promise<string> {
  const { email, name } = readArgs(args);
  let config;
  try {
    config = loadConfig(env);
  } catch (err) {
    if (err instanceof ConfigError) throw new Refusal(err.message.replace(/\n\s*/g, ' '), 2);
    throw err;
  }
  const secret = await password();
  if (!secret) throw new Refusal('admin:create: no password on standard input', 2);
  const problem = passwordProblem(secret, { email, name });
  if (problem) throw new Refusal(`admin:create: the password ${problem}`, 1);

  configurePasswordHashing({ cost: config.scryptCost });
  const sequelize = await connect(config.databaseUrl);
  try {
    initModels(sequelize);
    await migrate(sequelize);
    hardenFiles(config);
    if (await User.findOne({ where: { email } })) throw new Refusal(`admin:create: a user with e-mail ${email} already exists`, 1);
    const user = await User.create({ email, name, role: 'admin', phone: null, passwordHash: await hashPassword(secret), mustChangePassword: false });
    securityLog(createLogger(config, pino.destination({ dest: 2, sync: true })))('admin-created', { userId: user.id, email, by: 'admin:create' });
    return `Created administrator ${name} <${email}> (user ${user.id}).`;
  } finally {
    await sequelize.close();
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  process.umask(0o027);
  adminCreate(process.argv.slice(2), readPassword).then(
    (line) => process.stdout.write(`${line}\n`),
    (err: unknown) => {
      if (err instanceof Refusal) {
        process.stderr.write(`${err.message}\n`);
        process.exit(err.exitCode);
      }
      process.stderr.write(`admin:create: ${(err as Error)?.message ?? String(err)}\n`);
      process.exit(1);
    },
  );
}
