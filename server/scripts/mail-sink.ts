import { join } from 'node:path';
import { startLocalMailService } from '../mail/local-mail-service';

/**
 * `npm start`'s local mail service: receives every message the server sends on loopback and stores it under
 * .data/mail/ (one .eml file each, opened by any mail program, and index.jsonl). Nothing leaves the machine.
 */
const port = Number(process.env['BW_SMTP_PORT'] ?? 2525);
const dir = join(process.cwd(), '.data', 'mail');
const service = await startLocalMailService({ host: '127.0.0.1', port, dir }).catch((err: Error) => {
  console.error(`The local mail service cannot listen on 127.0.0.1:${port}: ${err.message}. Set BW_SMTP_PORT to a free port.`);
  process.exit(1);
});
console.log(`[mail] local mail service on 127.0.0.1:${service.port}; messages are stored in ${dir}`);
const stop = () => void service.close().then(() => process.exit(0));
process.once('SIGINT', stop);
process.once('SIGTERM', stop);
