import { execFileSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';

export interface CertificateFiles {
  certPath: string;
  keyPath: string;
}

/**
 * A self-signed certificate for MQTT over TLS in development, made once with Debian's `openssl` and kept in `dir`
 * (`broker-cert.pem`, `broker-key.pem`). It names 127.0.0.1 and localhost; a unit trusts it by using the certificate
 * itself as its CA. Production sets BW_BROKER_TLS_CERT / BW_BROKER_TLS_KEY instead.
 */
export function ensureDevCertificate(dir: string): CertificateFiles & { created: boolean } {
  const certPath = join(dir, 'broker-cert.pem');
  const keyPath = join(dir, 'broker-key.pem');
  if (existsSync(certPath) && existsSync(keyPath)) return { certPath, keyPath, created: false };
  mkdirSync(dir, { recursive: true });
  const tmpCert = `${certPath}.${process.pid}.tmp`;
  const tmpKey = `${keyPath}.${process.pid}.tmp`;
  try {
    execFileSync(
      'openssl',
      [
        'req',
        '-x509',
        '-newkey',
        'ec',
        '-pkeyopt',
        'ec_paramgen_curve:prime256v1',
        '-nodes',
        '-days',
        '825',
        '-subj',
        '/CN=Brightward development MQTT broker',
        '-addext',
        'subjectAltName=IP:127.0.0.1,IP:::1,DNS:localhost',
        '-keyout',
        tmpKey,
        '-out',
        tmpCert,
      ],
      { stdio: ['ignore', 'ignore', 'pipe'] },
    );
    chmodSync(tmpKey, 0o600);
    renameSync(tmpKey, keyPath);
    renameSync(tmpCert, certPath);
  } catch (err) {
    rmSync(tmpCert, { force: true });
    rmSync(tmpKey, { force: true });
    const missing = (err as { code?: string }).code === 'ENOENT';
    throw new Error(
      missing
        ? 'MQTT over TLS needs a certificate: install openssl (apt-get install openssl) to make the development one, or set BW_BROKER_TLS_CERT and BW_BROKER_TLS_KEY.'
        : `Could not make the development certificate in ${dir}: ${String((err as { stderr?: Buffer }).stderr ?? (err as Error).message).trim()}`,
    );
  }
  return { certPath, keyPath, created: true };
}
