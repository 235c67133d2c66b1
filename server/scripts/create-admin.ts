import bcrypt from 'bcryptjs';
import { createInterface } from 'node:readline/promises';
import { parseArgs } from 'node:util';
import { loadConfig } from '../config';
import { createDb, describeDbError } from '../data/db';
import { UserRepository } from '../data/user-repository';
import { AuditRepository } from '../data/audit-repository';
import { createUserBody } from '../routes/schemas';

/**
 * `npm run admin:create -- --email <e-mail> --name <name>`: the first account of a real deployment (which starts with
 * no accounts: the demo world is only seeded when asked for). The password comes from BW_ADMIN_PASSWORD or is read
 * from standard input, never from the command line (it would stay in the shell history and the process list).
 */
const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } });
const password = process.env['BW_ADMIN_PASSWORD'] ?? (await readPassword());
const parsed = createUserBody.safeParse({ email: values.email, name: values.name, role: 'admin', password });
if (!parsed.success) {
  for (const i of parsed.error.issues) console.error(`[admin] ${i.path.join('.') || 'input'}: ${i.message}`);
  console.error('usage: npm run admin:create -- --email <e-mail> --name <name>   (password from BW_ADMIN_PASSWORD or standard input)');
  process.exit(2);
}
const config = loadConfig();
const db = createDb(config.db);
try {
  const users = new UserRepository(db);
  const email = parsed.data.email.toLowerCase();
  if (await users.findByEmail(email)) {
    console.error(`[admin] ${email} already has an account; change its role or password from the People screen.`);
    process.exitCode = 1;
  } else {
    const id = await users.insert({
      email,
      name: parsed.data.name,
      role: 'admin',
      ownerId: null,
      passwordHash: await bcrypt.hash(password, config.bcryptCost),
    });
    await new AuditRepository(db).append({
      userId: null,
      action: 'user-create',
      target: `user:${id}`,
      detail: { email, role: 'admin', via: 'admin:create' },
    });
    console.log(`[admin] created admin ${email}`);
  }
} catch (err) {
  console.error(`[admin] ${describeDbError(err, config.db)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}

async function readPassword(): Promise<string> {
  const rl = createInterface({ input: process.stdin, output: process.stderr, terminal: false });
  if (process.stdin.isTTY) process.stderr.write('Password for the new admin (at least 10 characters): ');
  const line = await rl[Symbol.asyncIterator]().next();
  rl.close();
  return typeof line.value === 'string' ? line.value : '';
}
